import { openingCheck, DEFAULT_OPENING_SETTINGS, type OpeningCheckResult, type OpeningSettings } from '../../../shared/work/opening-check';
import { HttpError } from '../../http-error';
import type { Engine, Models } from '../../models';
import { openingTimings, type OpeningTimings } from './opening-settings';
import type { ReadingHistory } from './reading-history';

/**
 * Settings of the opening check for one engine: its own safe opening temperature and heater; the
 * timings from the environment (OPENING_MIN_STOPPED_S, OPENING_HOLD_S); the rest are the shared defaults.
 */
export function gateSettings(
  engine: Pick<Engine, 'safeOpenTempC' | 'heaterSetpointC'>,
  ambientC: number | null,
  timings: OpeningTimings = openingTimings(),
): OpeningSettings {
  return { ...DEFAULT_OPENING_SETTINGS, ...timings, safeOpenTempC: engine.safeOpenTempC ?? 50, heaterSetpointC: engine.heaterSetpointC ?? null, ambientC };
}

export interface GateResult extends OpeningCheckResult {
  settings: OpeningSettings;
  /** ms of the newest good reading the check saw per channel, null when none. */
  latestTs: { coolant_temp: number | null; coolant_pressure: number | null; engine_speed: number | null };
}

/**
 * The opening check as the server sees it now, from the readings it holds: the same shared
 * function the client shows, so the client's lock is only its face.
 */
export async function computeGate(history: ReadingHistory, engine: Engine, lockoutConfirmed: boolean, now = Date.now()): Promise<GateResult> {
  const s = await history.series(engine.id, now);
  // the stop as the stored record shows it, however long ago (the series above holds only the last hours)
  const stop = await history.stopRecord(engine.id, now);
  const amb = s.ambient_temp[s.ambient_temp.length - 1];
  // ambient is only a hint for the prediction; an hour-old value is still better than none
  const ambientC = amb && now - amb.ts < 3600_000 ? amb.value : null;
  const settings = gateSettings(engine, ambientC);
  const result = openingCheck(
    {
      readings: { coolant_temp: s.coolant_temp, coolant_pressure: s.coolant_pressure, engine_speed: s.engine_speed },
      settings,
      lockoutConfirmed,
      stoppedSinceTs: stop?.stoppedSinceTs ?? null,
    },
    now,
  );
  const newest = (l: readonly { ts: number; quality?: number }[]) => {
    for (let i = l.length - 1; i >= 0; i--) if ((l[i].quality ?? 0) === 0 && l[i].ts <= now) return l[i].ts;
    return null;
  };
  return {
    ...result,
    settings,
    latestTs: { coolant_temp: newest(s.coolant_temp), coolant_pressure: newest(s.coolant_pressure), engine_speed: newest(s.engine_speed) },
  };
}

export interface Objection {
  name: 'engine-stopped' | 'coolant-temperature' | 'coolant-pressure';
  value: number;
  limit: number;
  unit: string;
}

/**
 * Conditions where fresh live data says "not safe" (running or recently stopped, hot, under pressure).
 * A manual check is for missing or stale data only: it may never overrule one of these.
 */
export function liveObjections(g: GateResult, now = Date.now()): Objection[] {
  const out: Objection[] = [];
  const staleMs = g.settings.staleAfterS * 1000;
  for (const c of g.conditions) {
    if (c.met || typeof c.value !== 'number') continue;
    if (c.name === 'coolant-temperature' || c.name === 'coolant-pressure') {
      const ts = c.name === 'coolant-temperature' ? g.latestTs.coolant_temp : g.latestTs.coolant_pressure;
      if (ts !== null && now - ts <= staleMs) out.push({ name: c.name, value: c.value, limit: Number(c.limit), unit: c.unit });
    } else if (c.name === 'engine-stopped') {
      const ts = g.latestTs.engine_speed;
      if (ts !== null && now - ts <= staleMs) out.push({ name: c.name, value: c.value, limit: Number(c.limit), unit: c.unit });
    }
  }
  return out;
}

/** GET /api/engines/:id/opening-check: the check for one engine now, as the work-order page shows it. */
export async function openingCheckOf(models: Models, history: ReadingHistory, engineId: number, lockoutConfirmed: boolean) {
  const engine = await models.Engine.findByPk(engineId);
  if (!engine) throw new HttpError(404, 'engine not found');
  const g = await computeGate(history, engine, lockoutConfirmed);
  return {
    engineId: engine.id,
    at: new Date().toISOString(),
    clear: g.clear,
    conditions: g.conditions,
    clearAt: g.clearAt,
    forecast: g.forecast,
    reasons: g.reasons,
    stale: g.stale,
    settings: g.settings,
  };
}
