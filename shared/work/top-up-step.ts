/**
 * The step of a top-up work order that records the coolant added (volume and what it was). Completing it records a
 * coolant top-up (server/services/coolant/top-ups.ts), so the additive estimate follows the work done.
 */
export const TOP_UP_ORDER_KIND = 'top-up';
export const TOP_UP_STEP_KEY = 'add';

export function isTopUpStep(orderKind: string, stepKey: string): boolean {
  return orderKind === TOP_UP_ORDER_KIND && stepKey === TOP_UP_STEP_KEY;
}
