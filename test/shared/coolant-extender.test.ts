/**
 * Extended-life coolant in the default service plan: an extender task (common practice, from memory: about midway
 * through the coolant's life, 6000 h or 3 years, a placeholder for the coolant maker's interval) and the coolant
 * test as a lab analysis (test strips do not apply to extended-life coolant: common practice).
 */
import { DEFAULT_EXTENDER_INTERVAL, defaultServicePlan, dueList } from '../../shared/service/due-list';

const DAY = 86400000;
const NOW = Date.UTC(2026, 11, 1);

describe('extended-life coolant extender in the service plan', () => {
  it('conventional coolant: no extender task; the plan is unchanged', () => {
    const keys = defaultServicePlan({ oilDrainIntervalH: 250, duty: 'standby', coolantFamily: 'conventional' }).map((t) => t.key);
    expect(keys).not.toContain('coolant-extender');
    expect(keys).toEqual(defaultServicePlan({ oilDrainIntervalH: 250, duty: 'standby' }).map((t) => t.key));
  });
  it('extended-life: the extender at 6000 h or 1095 days as a placeholder, and the coolant test is a lab analysis', () => {
    const plan = defaultServicePlan({ oilDrainIntervalH: 500, duty: 'prime', coolantFamily: 'extended-life' });
    const ext = plan.find((t) => t.key === 'coolant-extender')!;
    expect(ext).toMatchObject({ everyHours: 6000, everyDays: 1095, placeholder: true });
    expect(DEFAULT_EXTENDER_INTERVAL).toEqual({ everyHours: 6000, everyDays: 1095 });
    expect(ext.basis).toMatch(/common practice/);
    expect(plan.find((t) => t.key === 'coolant-test')!.title).toMatch(/lab analysis/);
  });
  it("the administrator's interval replaces the placeholder", () => {
    const ext = defaultServicePlan({
      oilDrainIntervalH: 500,
      duty: 'prime',
      coolantFamily: 'extended-life',
      extender: { everyHours: 4000, everyDays: null },
    }).find((t) => t.key === 'coolant-extender')!;
    expect(ext).toMatchObject({ everyHours: 4000, everyDays: null });
    expect(ext.placeholder).toBeUndefined();
  });
  it('due by whichever comes first: 1000 days after the refill is ok, 1100 days is overdue (1095-day interval)', () => {
    const plan = defaultServicePlan({ oilDrainIntervalH: 500, duty: 'prime', coolantFamily: 'extended-life' }).filter((t) => t.key === 'coolant-extender');
    const at = (days: number) =>
      dueList(plan, { 'coolant-extender': { lastDoneAt: NOW - days * DAY, lastDoneRunHours: 100 } }, { runHoursNow: 200, now: NOW }, 14)[0].state;
    expect(at(1000)).toBe('ok');
    expect(at(1100)).toBe('overdue');
  });
});
