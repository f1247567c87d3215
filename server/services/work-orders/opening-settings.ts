import { DEFAULT_OPENING_SETTINGS, type OpeningSettings } from '../../../shared/work/opening-check';

/**
 * Timings of the opening check that a site (or a test) may set from the environment, in wall-clock
 * seconds. Defaults are the safe ones of shared/work/opening-check.ts; shorter values are for tests
 * and demos with a sped-up simulator only.
 *   OPENING_MIN_STOPPED_S [600]: the engine must have been stopped this long.
 *   OPENING_HOLD_S [120]: every condition must have held together this long.
 */
export type OpeningTimings = Pick<OpeningSettings, 'minStoppedS' | 'holdS'>;

function seconds(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a number of seconds >= 0, got "${raw}"`);
  return n;
}

export function loadOpeningTimings(env: NodeJS.ProcessEnv = process.env): OpeningTimings {
  return {
    minStoppedS: seconds(env, 'OPENING_MIN_STOPPED_S', DEFAULT_OPENING_SETTINGS.minStoppedS),
    holdS: seconds(env, 'OPENING_HOLD_S', DEFAULT_OPENING_SETTINGS.holdS),
  };
}

let cached: OpeningTimings | null = null;

/** The process's timings, read from the environment once (both the route and step completion use these). */
export function openingTimings(): OpeningTimings {
  return (cached ??= loadOpeningTimings());
}
