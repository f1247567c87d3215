import type { Role } from '../../models/user';
import type { WorkStatus } from '../../models/work-order';

export interface Transition {
  from: WorkStatus;
  to: WorkStatus;
  roles: readonly Role[];
  /** Name of the history event. */
  event: string;
  /** A note is required (declining, sending back, cancelling work under way). */
  needsNote?: boolean;
}

/**
 * Every allowed move of a work order and who may make it. Anything not listed is refused.
 * A closed order never moves again; what is learned later is appended as an amendment.
 */
export const TRANSITIONS: readonly Transition[] = Object.freeze([
  { from: 'requested', to: 'planned', roles: ['planner', 'admin'], event: 'accepted' },
  { from: 'requested', to: 'cancelled', roles: ['planner', 'admin'], event: 'declined', needsNote: true },
  { from: 'planned', to: 'in-progress', roles: ['technician'], event: 'started' },
  { from: 'planned', to: 'cancelled', roles: ['planner', 'admin'], event: 'cancelled', needsNote: true },
  { from: 'in-progress', to: 'waiting-sign-off', roles: ['technician'], event: 'completed' },
  { from: 'in-progress', to: 'cancelled', roles: ['planner', 'admin'], event: 'cancelled', needsNote: true },
  { from: 'waiting-sign-off', to: 'closed', roles: ['planner', 'admin'], event: 'signed-off' },
  { from: 'waiting-sign-off', to: 'in-progress', roles: ['planner', 'admin'], event: 'sent-back', needsNote: true },
] as Transition[]);

export function findTransition(from: WorkStatus, to: WorkStatus): Transition | undefined {
  return TRANSITIONS.find((t) => t.from === from && t.to === to);
}

/** Statuses in which the order's content (plan, steps, parts, attachments) may still change. */
export const EDITABLE: readonly WorkStatus[] = ['requested', 'planned', 'in-progress'];
export const FINISHED: readonly WorkStatus[] = ['closed', 'cancelled'];

export const STATUS_TEXT: Record<WorkStatus, string> = {
  requested: 'requested',
  planned: 'planned',
  'in-progress': 'in progress',
  'waiting-sign-off': 'waiting for sign-off',
  closed: 'closed',
  cancelled: 'cancelled',
};
