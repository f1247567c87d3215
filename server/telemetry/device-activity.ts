import type { Sequelize } from 'sequelize';
import type { Logger } from '../logger';
import { sqlDate, touchDevicesSql, upsertRejectionsSql } from './sql';

interface PendingRejection {
  deviceId: number;
  reason: string;
  count: number;
  lastAt: number;
  detail: string;
}

/**
 * Per-device rejections and last-seen times, gathered in memory and written every few seconds:
 * never a database call per message.
 */
export class DeviceActivity {
  private rejections = new Map<string, PendingRejection>();
  private seen = new Set<number>();
  private readonly totals = new Map<number, Record<string, number>>();
  private timer: NodeJS.Timeout | null = null;
  private writing: Promise<void> | null = null;

  constructor(
    private readonly sequelize: Sequelize,
    private readonly log: Logger,
    private readonly everyMs = 2000,
  ) {}

  start(): void {
    this.timer = setInterval(() => void this.persist(), this.everyMs);
    this.timer.unref();
  }

  seenDevice(deviceId: number | null): void {
    if (deviceId !== null) this.seen.add(deviceId);
  }

  reject(deviceId: number | null, reason: string, detail: string, at = Date.now()): void {
    if (deviceId === null) return;
    const key = deviceId + '\u0000' + reason;
    const p = this.rejections.get(key);
    if (p) {
      p.count++;
      p.lastAt = at;
      p.detail = detail;
    } else this.rejections.set(key, { deviceId, reason, count: 1, lastAt: at, detail });
    const t = this.totals.get(deviceId) ?? {};
    t[reason] = (t[reason] ?? 0) + 1;
    this.totals.set(deviceId, t);
  }

  /** Reject counts per device since start. */
  rejectsByDevice(): Record<number, Record<string, number>> {
    return Object.fromEntries(this.totals);
  }

  async persist(): Promise<void> {
    if (this.writing) return this.writing;
    this.writing = this.write().finally(() => {
      this.writing = null;
    });
    return this.writing;
  }

  private async write(): Promise<void> {
    const rejections = [...this.rejections.values()];
    const seen = [...this.seen];
    this.rejections = new Map();
    this.seen = new Set();
    try {
      for (let i = 0; i < rejections.length; i += 200) {
        const chunk = rejections.slice(i, i + 200);
        const bind: Array<string | number> = [];
        for (const r of chunk) bind.push(r.deviceId, r.reason, r.count, sqlDate(r.lastAt), r.detail.slice(0, 500));
        await this.sequelize.query(upsertRejectionsSql(chunk.length), { bind, logging: false });
      }
      for (let i = 0; i < seen.length; i += 500) {
        const chunk = seen.slice(i, i + 500);
        await this.sequelize.query(touchDevicesSql(chunk.length), { bind: [sqlDate(Date.now()), ...chunk], logging: false });
      }
    } catch (err) {
      // a device removed meanwhile (foreign key) or a busy database: log, keep serving
      this.log.warn('telemetry: could not persist device activity', err instanceof Error ? err.message : err);
    }
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    if (this.writing) await this.writing;
    await this.write();
  }
}
