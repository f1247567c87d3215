import { filterDefault } from './parts-default';
import { CoolantTestSummary } from './work-types';

const test = (id: number, testedAt: string, filter: 'charged' | 'blank' | null): CoolantTestSummary => ({
  id,
  testedAt,
  decision: { additive: filter === null ? null : { filter } },
});

describe('filterDefault', () => {
  it('follows the latest decision (newest first), not an older one', () => {
    const d = filterDefault([test(3, '2026-11-20T09:00:00Z', 'charged'), test(2, '2026-05-02T09:00:00Z', 'blank')]);
    expect(d.kind).toBe('filter-charged');
    expect(d.hint).toMatch(/^Charged filter, as the additive test of .*2026.* says\.$/);
    expect(filterDefault([test(4, '2026-11-21T09:00:00Z', 'blank'), test(3, '2026-11-20T09:00:00Z', 'charged')]).kind).toBe('filter-blank');
  });

  it('no test: no default and a hint to test first', () => {
    const d = filterDefault([]);
    expect(d.kind).toBeNull();
    expect(d.hint).toMatch(/test the additive level first/);
  });

  it('a latest test without an additive decision does not fall back to an older one', () => {
    expect(filterDefault([test(5, '2026-11-22T09:00:00Z', null), test(3, '2026-11-20T09:00:00Z', 'charged')]).kind).toBeNull();
  });
});
