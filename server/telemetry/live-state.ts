import { QueryTypes, type Sequelize } from 'sequelize';
import { channelByCode, RUNNING_RPM, type ChannelKey } from '../../shared/channels';
import { LATEST_READINGS_SQL } from './sql';
import type { AcceptedReading, LatestValue, LiveState, RunState } from './types';

/** Nothing heard from an engine for this long: its state is unknown. */
export const NO_DATA_AFTER_MS = 5 * 60 * 1000;

interface EngineLive {
  latest: Partial<Record<ChannelKey, LatestValue>>;
  lastSeen: number;
  /** A death certificate arrived at this time and no data since: the engine's data is lost. */
  lostAt?: number;
}

/** Latest value per engine and channel, kept in memory from the ingest stream. */
export class MemoryLiveState implements LiveState {
  private readonly engines = new Map<number, EngineLive>();

  /** One query at start: the newest stored reading of every engine/channel. */
  async load(sequelize: Sequelize): Promise<void> {
    const rows = await sequelize.query<{ engineId: number; channel: number; ts: number; value: number; quality: number }>(LATEST_READINGS_SQL, {
      type: QueryTypes.SELECT,
      logging: false,
    });
    for (const r of rows) {
      const info = channelByCode(Number(r.channel));
      if (!info) continue;
      this.apply(Number(r.engineId), info.key, Number(r.ts), Number(r.value), r.quality ? 1 : 0, Number(r.ts));
    }
  }

  /** `arrivedAt` is when the server heard it (lastSeen), `ts` when the device measured it. */
  apply(engineId: number, channel: ChannelKey, ts: number, value: number, quality: 0 | 1, arrivedAt: number): void {
    let e = this.engines.get(engineId);
    if (!e) {
      e = { latest: {}, lastSeen: arrivedAt };
      this.engines.set(engineId, e);
    }
    if (arrivedAt > e.lastSeen) e.lastSeen = arrivedAt;
    if (e.lostAt !== undefined && arrivedAt >= e.lostAt) e.lostAt = undefined;
    const prev = e.latest[channel];
    // late samples (a gateway's offline backlog) must not replace a newer value
    if (!prev || ts >= prev.ts) e.latest[channel] = { value, ts, quality };
  }

  applyAll(readings: AcceptedReading[], arrivedAt: number): void {
    for (const r of readings) this.apply(r.engineId, r.channel, r.ts, r.value, r.quality, arrivedAt);
  }

  /**
   * The engine's data is lost now (a Sparkplug NDEATH/DDEATH): its latest values turn bad quality and
   * its run state is no-data until new data arrives. Returns the values as they now stand (null: none).
   */
  markLost(engineId: number, at: number): Partial<Record<ChannelKey, LatestValue>> | null {
    const e = this.engines.get(engineId);
    if (!e) return null;
    e.lostAt = at;
    for (const key of Object.keys(e.latest) as ChannelKey[]) e.latest[key] = { ...e.latest[key]!, quality: 1 };
    return { ...e.latest };
  }

  latest(engineId: number): Partial<Record<ChannelKey, LatestValue>> {
    return { ...(this.engines.get(engineId)?.latest ?? {}) };
  }

  lastSeen(engineId: number): number | null {
    return this.engines.get(engineId)?.lastSeen ?? null;
  }

  /**
   * running: a fresh, good engine_speed at or above RUNNING_RPM; stopped: a fresh, good speed below it;
   * no-data otherwise. Without a fresh good speed we do not claim "stopped": steps that need a
   * stopped engine must not unlock on a guess.
   */
  runState(engineId: number, now = Date.now()): RunState {
    const e = this.engines.get(engineId);
    if (!e || now - e.lastSeen > NO_DATA_AFTER_MS || e.lostAt !== undefined) return 'no-data';
    const speed = e.latest.engine_speed;
    if (!speed || speed.quality !== 0 || now - speed.ts > NO_DATA_AFTER_MS) return 'no-data';
    return speed.value >= RUNNING_RPM ? 'running' : 'stopped';
  }
}
