import { checkDueDate, fromDateOnly, toDateOnly } from './due-date';

describe('due dates', () => {
  it('only whole dates in 2000..2100 are accepted; half-typed years are refused', () => {
    expect(checkDueDate(new Date(2026, 11, 5), '05/12/2026')).toEqual({ ok: true, value: '2026-12-05' });
    expect(checkDueDate(new Date(2, 11, 5), '05/12/0002')).toMatchObject({ ok: false });
    expect(checkDueDate(new Date(202, 11, 5), '05/12/0202')).toMatchObject({ ok: false });
    expect(checkDueDate(new Date(2002, 11, 5), '12/5/2')).toMatchObject({ ok: false }); // a parser's guess at a 1-digit year
    expect(checkDueDate(null, '31/02/2026')).toMatchObject({ ok: false });
    expect(checkDueDate(null, '')).toEqual({ ok: true, value: null });
  });

  it('round-trips YYYY-MM-DD through the local calendar date', () => {
    expect(toDateOnly(fromDateOnly('2026-03-29')!)).toBe('2026-03-29');
    expect(fromDateOnly('2026-3-29')).toBeNull();
  });
});
