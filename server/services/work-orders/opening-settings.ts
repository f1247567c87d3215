import type { OpeningSettings } from '../../../shared/work/opening-check';
import { parseEnv } from '../../config';

/**
 * Timings of the opening check that a site (or a test) may set from the environment, in wall-clock
 * seconds (rules in server/config.ts envSchema). Defaults are the safe ones of shared/work/opening-check.ts; shorter values are for tests
 * and demos with a sped-up simulator only.
 *   OPENING_MIN_STOPPED_S [600]: the engine must have been stopped this long.
 *   OPENING_HOLD_S [120]: every condition must have held together this long.
 */
export type OpeningTimings = Pick<OpeningSettings, 'minStoppedS' | 'holdS'>;

export function loadOpeningTimings(env: NodeJS.ProcessEnv = process.env): OpeningTimings {
  const e = parseEnv(env);
  return { minStoppedS: e.OPENING_MIN_STOPPED_S, holdS: e.OPENING_HOLD_S };
}

let cached: OpeningTimings | null = null;

/** The process's timings, read from the environment once (both the route and step completion use these). */
export function openingTimings(): OpeningTimings {
  return (cached ??= loadOpeningTimings());
}
