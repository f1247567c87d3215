import { formatDate } from './work-labels';
import { CoolantTestSummary } from './work-types';

export interface FilterDefault {
  /** Part kind to start the "What" choice on; null when no test says which filter. */
  kind: 'filter-charged' | 'filter-blank' | null;
  /** Words shown beside the choice. */
  hint: string;
  testedAt: string | null;
}

/**
 * The coolant filter a filter change starts on: the one the engine's latest additive test decided
 * (shared/coolant/additive.ts: charged while the additive is low or in range, blank while it is high).
 * `tests` newest first, as GET /api/engines/:id/coolant-tests answers. Only the latest test counts:
 * an older decision is out of date once a newer test exists, even one that decided nothing.
 */
export function filterDefault(tests: readonly CoolantTestSummary[]): FilterDefault {
  const latest = tests[0];
  if (!latest)
    return { kind: null, testedAt: null, hint: 'No coolant test on record: test the additive level first, it decides between a charged and a blank filter.' };
  const filter = latest.decision?.additive?.filter ?? null;
  const date = formatDate(latest.testedAt);
  if (filter === 'charged') return { kind: 'filter-charged', testedAt: latest.testedAt, hint: `Charged filter, as the additive test of ${date} says.` };
  if (filter === 'blank') return { kind: 'filter-blank', testedAt: latest.testedAt, hint: `Blank filter, as the additive test of ${date} says.` };
  return { kind: null, testedAt: latest.testedAt, hint: `The test of ${date} has no additive reading to decide the filter: test the additive level first.` };
}
