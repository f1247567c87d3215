/**
 * Names in the order people expect ("Engine 2" before "Engine 10"). One collator for the app: `localeCompare` with
 * options builds a new one on every call, which made sorting a 2,000-engine board take over a second.
 */
const collator = new Intl.Collator(undefined, { numeric: true });

export const byName = (a: string, b: string): number => collator.compare(a, b);
