import { RUNNING_RPM } from '../../../shared/channels';
import { badRequest } from '../../http-error';
import type { Logger } from '../../logger';
import type { Models } from '../../models';
import type { AcceptedReading } from '../../telemetry/types';
import { getEngine } from '../engines';

/** A gap in speed readings longer than this is not counted: we do not know whether the engine ran. */
export const MAX_COUNTED_GAP_MS = 5 * 60 * 1000;
export const FLUSH_EVERY_MS = 60 * 1000;

/**
 * Run hours from the engine_speed channel: the time between consecutive good speed readings counts when the
 * earlier one was at or above RUNNING_RPM. Pending hours are added to engines.run_hours in one increment per
 * engine at most once a FLUSH_EVERY_MS (an increment, so a concurrent hand correction is not overwritten).
 */
export class RunHoursCounter {
  private readonly last = new Map<number, { ts: number; running: boolean }>();
  private readonly pendingMs = new Map<number, number>();
  private timer: NodeJS.Timeout | null = null;
  private flushing: Promise<void> | null = null;

  constructor(
    private readonly models: Models,
    private readonly log: Logger,
    private readonly flushEveryMs = FLUSH_EVERY_MS,
  ) {}

  /** telemetry.onReadings listener: synchronous, memory only. */
  readonly onReadings = (readings: AcceptedReading[]): void => {
    for (const r of readings) {
      if (r.channel !== 'engine_speed' || r.quality !== 0) continue;
      const prev = this.last.get(r.engineId);
      if (prev && r.ts <= prev.ts) continue; // late backlog sample: already past it
      if (prev && prev.running && r.ts - prev.ts <= MAX_COUNTED_GAP_MS) {
        this.pendingMs.set(r.engineId, (this.pendingMs.get(r.engineId) ?? 0) + (r.ts - prev.ts));
      }
      this.last.set(r.engineId, { ts: r.ts, running: r.value >= RUNNING_RPM });
    }
  };

  pendingHours(engineId: number): number {
    return (this.pendingMs.get(engineId) ?? 0) / 3_600_000;
  }

  /** Forget what was counted but not written (the hour meter was just read by hand). */
  discardPending(engineId: number): void {
    this.pendingMs.delete(engineId);
  }

  start(): void {
    if (this.timer) return;
    this.timer = setInterval(() => void this.flush(), this.flushEveryMs);
    this.timer.unref();
  }

  /** Write pending hours; one at a time. */
  flush(): Promise<void> {
    if (this.flushing) return this.flushing;
    const batch = [...this.pendingMs.entries()].filter(([, ms]) => ms > 0);
    this.pendingMs.clear();
    if (!batch.length) return Promise.resolve();
    this.flushing = (async () => {
      for (const [engineId, ms] of batch) {
        try {
          await this.models.Engine.increment('runHours', { by: ms / 3_600_000, where: { id: engineId } });
        } catch (err) {
          // keep the hours for the next round rather than lose them
          this.pendingMs.set(engineId, (this.pendingMs.get(engineId) ?? 0) + ms);
          this.log.warn(`run hours: write for engine ${engineId} failed`, err);
        }
      }
    })().finally(() => {
      this.flushing = null;
    });
    return this.flushing;
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.flush();
  }
}

/** Set run hours from the engine's hour meter, with an audit entry (old, new, who, why). */
export async function correctRunHours(
  models: Models,
  engineId: number,
  input: { runHours: number; reason: string },
  userId: number,
  counter?: RunHoursCounter | null,
) {
  const engine = await getEngine(models, engineId);
  if (engine.retiredAt) throw badRequest('engine is retired', 'engineId');
  const old = engine.runHours;
  counter?.discardPending(engineId);
  const at = new Date();
  await models.Engine.sequelize!.transaction(async (transaction) => {
    await engine.update({ runHours: input.runHours }, { transaction });
    await models.RunHoursAdjustment.create({ engineId, oldRunHours: old, newRunHours: input.runHours, userId, reason: input.reason, at }, { transaction });
  });
  return { engineId, oldRunHours: old, runHours: input.runHours, reason: input.reason, at: at.toISOString(), userId };
}

export async function runHoursHistory(models: Models, engineId: number) {
  await getEngine(models, engineId);
  const rows = await models.RunHoursAdjustment.findAll({
    where: { engineId },
    order: [
      ['at', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 200,
  });
  const ids = [...new Set(rows.map((r) => r.userId).filter((x): x is number => x !== null))];
  const names = new Map((ids.length ? await models.User.findAll({ where: { id: ids }, attributes: ['id', 'name'] }) : []).map((u) => [u.id, u.name]));
  return rows.map((r) => ({
    id: r.id,
    oldRunHours: r.oldRunHours,
    newRunHours: r.newRunHours,
    userId: r.userId,
    userName: r.userId === null ? null : (names.get(r.userId) ?? null),
    reason: r.reason,
    at: new Date(r.at).toISOString(),
  }));
}
