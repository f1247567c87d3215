/**
 * Steps that must wait for earlier ones: coolant goes in through the filler only once the step that relieves the
 * pressure and takes the cap off is done (that step waits for the opening check), never before. The template names
 * the keys a step waits for (`after`); the server refuses the step while one of them is not done and the client
 * shows it as waiting. Used by both so they say the same.
 */
export interface OrderedStepView {
  key: string;
  position: number;
  title: string;
  /** ISO time or Date when done, null when not. */
  doneAt: string | Date | null;
}

/** The first step (by position) among `after` that is not done yet, or null when the step may be done now. */
export function waitingFor<T extends OrderedStepView>(steps: readonly T[], after: readonly string[] | null | undefined): T | null {
  if (!after?.length) return null;
  return steps.filter((s) => after.includes(s.key) && !s.doneAt).sort((a, b) => a.position - b.position)[0] ?? null;
}

/** The words for a step that waits: "do step 3 first: Relieve the pressure and take off the filler cap". */
export function waitingText(s: Pick<OrderedStepView, 'position' | 'title'>): string {
  return `do step ${s.position} first: ${s.title}`;
}
