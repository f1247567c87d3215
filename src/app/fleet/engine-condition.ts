import { ChannelKey } from '../../../shared/channels';
import { isStale } from '../core/staleness';
import { Engine } from './fleet-types';
import { lastReadingAt, runStateAt, toMillis } from './run-state';

/** The values a fleet tile shows, in its order. */
export const TILE_CHANNELS: { key: ChannelKey; short: string }[] = [
  { key: 'coolant_temp', short: 'Temperature' },
  { key: 'coolant_pressure', short: 'Pressure' },
  { key: 'coolant_conductivity', short: 'Conductivity' },
];

/** One tile value is older than the engine's expected interval allows. */
export function isValueStale(engine: Engine, key: ChannelKey, now: number, intervalMs: number | null): boolean {
  const latest = engine.latest?.[key];
  return !!latest && isStale(toMillis(latest.ts), now, intervalMs);
}

/** Any value on the tile is stale, or readings stopped after there were some. */
export function isEngineStale(engine: Engine, now: number, intervalMs: number | null): boolean {
  if (TILE_CHANNELS.some(({ key }) => isValueStale(engine, key, now, intervalMs))) return true;
  return runStateAt(engine, now) === 'no-data' && lastReadingAt(engine) !== null;
}

/** Why an engine needs a look, as the tile shows it: active alarms, stale values, a standby engine not ready, freeze protection short. */
export interface EngineCondition {
  alarm: boolean;
  stale: boolean;
  notReady: boolean;
  freezeShort: boolean;
}

export function engineCondition(engine: Engine, now: number, intervalMs: number | null, activeAlarms: number): EngineCondition {
  return {
    alarm: activeAlarms > 0,
    stale: isEngineStale(engine, now, intervalMs),
    notReady: engine.readiness?.ready === false,
    freezeShort: engine.freezeProtection?.status === 'short',
  };
}

export const isAbnormal = (c: EngineCondition): boolean => c.alarm || c.stale || c.notReady || c.freezeShort;

/** How many engines of a group are abnormal, and for which reasons (an engine can count under several). */
export interface AbnormalCount {
  engines: number;
  abnormal: number;
  alarm: number;
  stale: number;
  notReady: number;
  freezeShort: number;
}

export function countAbnormal(conditions: readonly EngineCondition[]): AbnormalCount {
  const n: AbnormalCount = { engines: conditions.length, abnormal: 0, alarm: 0, stale: 0, notReady: 0, freezeShort: 0 };
  for (const c of conditions) {
    if (isAbnormal(c)) n.abnormal++;
    if (c.alarm) n.alarm++;
    if (c.stale) n.stale++;
    if (c.notReady) n.notReady++;
    if (c.freezeShort) n.freezeShort++;
  }
  return n;
}

/** "2 of 5 engines abnormal: 1 in alarm, 1 stale" or "All 5 engines normal". */
export function abnormalText(n: AbnormalCount): string {
  const noun = n.engines === 1 ? 'engine' : 'engines';
  if (n.abnormal === 0) return n.engines === 1 ? '1 engine, normal' : `All ${n.engines} ${noun} normal`;
  const why = [
    n.alarm && `${n.alarm} in alarm`,
    n.stale && `${n.stale} stale`,
    n.notReady && `${n.notReady} not ready`,
    n.freezeShort && `${n.freezeShort} freeze protection short`,
  ].filter(Boolean);
  return `${n.abnormal} of ${n.engines} ${noun} abnormal: ${why.join(', ')}`;
}
