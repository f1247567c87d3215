import { RUNNING_RPM } from '../../../shared/channels';
import { Engine, RunState } from './fleet-types';

/** No reading for this long and the engine shows "no data" (common practice for gateways reporting every few seconds). */
export const NO_DATA_AFTER_MS = 2 * 60 * 1000;

export function toMillis(ts: number | string | null | undefined): number | null {
  if (ts === null || ts === undefined) return null;
  const ms = typeof ts === 'number' ? ts : Date.parse(ts);
  return Number.isFinite(ms) ? ms : null;
}

/**
 * Time of the newest reading we know of. A gateway that is connected but sends nothing usable
 * (lastSeenAt recent, readings old) still has no data; lastSeenAt counts only when no reading is known at all.
 */
export function lastReadingAt(engine: Engine): number | null {
  let newest: number | null = null;
  for (const v of Object.values(engine.latest ?? {})) {
    const t = toMillis(v?.ts);
    if (t !== null && (newest === null || t > newest)) newest = t;
  }
  return newest;
}

/**
 * The run state on screen: the server's, kept current by live engine speed, and "no data" once readings stop.
 */
export function runStateAt(engine: Engine, now: number): RunState {
  const last = lastReadingAt(engine);
  if (last === null || now - last > NO_DATA_AFTER_MS) return 'no-data';
  const speed = engine.latest?.engine_speed;
  if (speed && speed.quality === 0 && Number.isFinite(speed.value)) return speed.value > RUNNING_RPM ? 'running' : 'stopped';
  return engine.runState === 'no-data' ? 'stopped' : engine.runState;
}
