/**
 * Alarm priority. Four levels, named rather than numbered so nobody has to remember whether 1 is
 * the top (ISA-18.2 asks for few priorities with a clear meaning, not for a particular scale).
 * Ranked low < medium < high < urgent.
 */
export const PRIORITIES = ['low', 'medium', 'high', 'urgent'] as const;
export type AlarmPriority = (typeof PRIORITIES)[number];

export function priorityRank(p: AlarmPriority): number {
  return PRIORITIES.indexOf(p);
}

export function isPriority(p: unknown): p is AlarmPriority {
  return typeof p === 'string' && (PRIORITIES as readonly string[]).includes(p);
}

/** True when `p` is at or above `min`. */
export function atLeast(p: AlarmPriority, min: AlarmPriority): boolean {
  return priorityRank(p) >= priorityRank(min);
}
