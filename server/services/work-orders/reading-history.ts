import { QueryTypes, type Sequelize } from 'sequelize';
import { CHANNELS, type ChannelKey } from '../../../shared/channels';
import type { TimedValue } from '../../../shared/work/opening-check';
import type { AcceptedReading } from '../../telemetry/types';

/** The channels the opening check reads. */
export const GATE_CHANNELS = ['coolant_temp', 'coolant_pressure', 'engine_speed', 'ambient_temp', 'coolant_conductivity'] as const satisfies readonly ChannelKey[];
export type GateChannel = (typeof GATE_CHANNELS)[number];

export interface HistoryOptions {
  /** How far back to keep, ms (default 3 h: enough for a cool-down fit). */
  keepMs?: number;
  /** Consecutive kept samples at least this far apart, ms; a newer one replaces the newest kept (default 2 s). */
  spacingMs?: number;
}

type Series = Record<GateChannel, TimedValue[]>;

const emptySeries = (): Series => ({ coolant_temp: [], coolant_pressure: [], engine_speed: [], ambient_temp: [], coolant_conductivity: [] });

/**
 * A short, bounded in-memory history per engine of the channels the opening check needs, fed from
 * telemetry.onReadings. At most keepMs / spacingMs samples per channel, so memory stays bounded
 * however fast a device publishes. On first use for an engine the recent past is loaded from the
 * readings table, so a restart (or an engine first asked about late) still has its cool-down curve.
 * Only engines asked about in the last keepMs are followed: a fleet of hundreds would otherwise hold
 * hours of samples for every engine (about 1 MB each) although only engines under work need them.
 */
export class ReadingHistory {
  private readonly engines = new Map<number, Series>();
  private readonly loaded = new Map<number, Promise<void>>();
  private readonly askedAt = new Map<number, number>();
  private readonly keepMs: number;
  private readonly spacingMs: number;

  constructor(private readonly sequelize: Sequelize | null, opts: HistoryOptions = {}) {
    this.keepMs = opts.keepMs ?? 3 * 3600 * 1000;
    this.spacingMs = opts.spacingMs ?? 2000;
  }

  /** Listener for telemetry.onReadings. */
  readonly onReadings = (readings: AcceptedReading[]): void => {
    for (const r of readings) {
      // without a database (tests) every engine is followed; with one, only engines asked about lately
      if (this.sequelize && !this.loaded.has(r.engineId)) continue;
      if ((GATE_CHANNELS as readonly string[]).includes(r.channel)) this.add(r.engineId, r.channel as GateChannel, { ts: r.ts, value: r.value, quality: r.quality });
    }
  };

  add(engineId: number, channel: GateChannel, v: TimedValue): void {
    let s = this.engines.get(engineId);
    if (!s) {
      s = emptySeries();
      this.engines.set(engineId, s);
    }
    const list = s[channel];
    const last = list[list.length - 1];
    if (!last || v.ts > last.ts) {
      const prev = list[list.length - 2];
      if (last && prev && last.ts - prev.ts < this.spacingMs) list[list.length - 1] = v;
      else list.push(v);
    } else if (v.ts < last.ts) {
      // a late sample (a gateway's offline backlog): insert in order, skip exact duplicates
      const i = list.findIndex((x) => x.ts >= v.ts);
      if (list[i].ts !== v.ts) list.splice(i, 0, v);
    } else {
      list[list.length - 1] = v;
    }
    const cutoff = v.ts - this.keepMs;
    let drop = 0;
    while (drop < list.length && list[drop].ts < cutoff) drop++;
    if (drop) list.splice(0, drop);
    const cap = Math.ceil(this.keepMs / this.spacingMs) + 16;
    if (list.length > cap) list.splice(0, list.length - cap);
  }

  /** The engine's history, once its recent past has been loaded from the database. */
  async series(engineId: number, now = Date.now()): Promise<Readonly<Series>> {
    this.forgetIdle(now);
    this.askedAt.set(engineId, now);
    await this.ensureLoaded(engineId, now);
    const s = this.engines.get(engineId) ?? emptySeries();
    return s;
  }

  /** Stop following engines nobody asked about for keepMs; asked again, they load from the database. */
  private forgetIdle(now: number): void {
    if (!this.sequelize) return;
    for (const [engineId, at] of this.askedAt) {
      if (now - at <= this.keepMs) continue;
      this.askedAt.delete(engineId);
      this.loaded.delete(engineId);
      this.engines.delete(engineId);
    }
  }

  private ensureLoaded(engineId: number, now: number): Promise<void> {
    if (!this.sequelize) return Promise.resolve();
    let p = this.loaded.get(engineId);
    if (!p) {
      p = this.load(engineId, now).catch((err) => {
        this.loaded.delete(engineId);
        throw err;
      });
      this.loaded.set(engineId, p);
    }
    return p;
  }

  /** One query: per channel and per spacing window, the last good reading (portable SQL). */
  private async load(engineId: number, now: number): Promise<void> {
    const codes = GATE_CHANNELS.map((k) => CHANNELS[k].code);
    // timestamps are milliseconds: 64-bit on both databases (PostgreSQL's INTEGER is 32-bit)
    const int = this.sequelize!.getDialect() === 'postgres' ? 'BIGINT' : 'INTEGER';
    const rows = await this.sequelize!.query<{ channel: number; ts: number; value: number }>(
      `SELECT channel, MAX(ts) AS ts, AVG(value) AS value FROM readings
        WHERE engine_id = ? AND channel IN (${codes.map(() => '?').join(',')}) AND quality = 0 AND ts >= CAST(? AS ${int})
        GROUP BY channel, CAST(ts / ? AS ${int}) ORDER BY ts`,
      { replacements: [engineId, ...codes, now - this.keepMs, this.spacingMs], type: QueryTypes.SELECT, logging: false },
    );
    const byCode = new Map(GATE_CHANNELS.map((k) => [CHANNELS[k].code, k]));
    for (const r of rows) {
      const key = byCode.get(Number(r.channel));
      if (key) this.add(engineId, key, { ts: Number(r.ts), value: Number(r.value), quality: 0 });
    }
  }
}
