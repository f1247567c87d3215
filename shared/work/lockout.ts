/**
 * Lockout/tagout is confirmed on the step that says to lock out and carried to the gated steps after it,
 * until a step that takes the lock off (to run the engine) is done. Used by the server (which decides) and
 * the client (which shows it), so both say the same. OSHA 29 CFR 1910.147 (control of hazardous energy).
 */

/** Steps whose completion is the lockout/tagout confirmation. */
export const LOCK_STEP_KEYS: readonly string[] = ['stop-and-lock-out', 'lock-out-again'];
/** Steps that take the lock off to run the engine: after one is done the lock must be applied again. */
export const UNLOCK_STEP_KEYS: readonly string[] = ['leak-run', 'return-to-service', 'flush-run'];

export interface LockoutStepView {
  key: string;
  position: number;
  /** ISO time or Date when done, null when not. */
  doneAt: string | Date | null;
}

const time = (d: string | Date | null) => (d === null ? NaN : new Date(d).getTime());

/**
 * The lock step whose confirmation holds for `gated`, or null: the nearest lock or unlock step before it
 * must be a done lock step, and no unlock step may have been done since that lock.
 */
export function lockoutFor<T extends LockoutStepView>(steps: readonly T[], gated: Pick<LockoutStepView, 'position'>): T | null {
  const before = steps
    .filter((s) => s.position < gated.position && (LOCK_STEP_KEYS.includes(s.key) || UNLOCK_STEP_KEYS.includes(s.key)))
    .sort((a, b) => b.position - a.position);
  const lock = before[0];
  if (!lock || !LOCK_STEP_KEYS.includes(lock.key) || !lock.doneAt) return null;
  const lockedAt = time(lock.doneAt);
  const unlockedSince = steps.some((s) => UNLOCK_STEP_KEYS.includes(s.key) && s.doneAt && time(s.doneAt) > lockedAt);
  return unlockedSince ? null : lock;
}

/** The lock step a gated step needs done first (nearest lock step before it), done or not; null if the template has none. */
export function lockStepBefore<T extends LockoutStepView>(steps: readonly T[], gated: Pick<LockoutStepView, 'position'>): T | null {
  return steps.filter((s) => s.position < gated.position && LOCK_STEP_KEYS.includes(s.key)).sort((a, b) => b.position - a.position)[0] ?? null;
}
