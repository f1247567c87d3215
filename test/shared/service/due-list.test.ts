import { dueStatus, dueList, defaultServicePlan, ServiceTask } from '../../../shared/service/due-list';

const DAY = 86_400_000;
const NOW = Date.UTC(2026, 5, 1, 8, 0, 0); // fixed clock
const oil: ServiceTask = { key: 'oil-drain', title: 'Oil drain', everyHours: 250, everyDays: 365, basis: 'test' };

describe('dueStatus: whichever comes first', () => {
  it('hours come first on a busy prime-power engine', () => {
    const s = dueStatus(oil, { runHoursNow: 1260, now: NOW, lastDoneAt: NOW - 40 * DAY, lastDoneRunHours: 1000 }, 14, 50);
    expect(s).toMatchObject({ state: 'overdue', dueAtRunHours: 1250, dueAt: NOW + 325 * DAY });
    expect(s.reason).toMatch(/10 run hours past 1250 h/);
  });

  it('calendar comes first on a standby engine that hardly runs', () => {
    const s = dueStatus(oil, { runHoursNow: 1030, now: NOW, lastDoneAt: NOW - 370 * DAY, lastDoneRunHours: 1000 });
    expect(s).toMatchObject({ state: 'overdue', dueAt: NOW - 5 * DAY, dueAtRunHours: 1250 });
    expect(s.reason).toMatch(/5 days past the 365-day date/);
    expect(s.reason).not.toMatch(/run hours past/);
  });

  it('due soon by hours inside the hours window, by days inside the days window', () => {
    const byHours = dueStatus(oil, { runHoursNow: 1210, now: NOW, lastDoneAt: NOW - 10 * DAY, lastDoneRunHours: 1000 }, 14, 50);
    expect(byHours.state).toBe('due-soon');
    expect(byHours.reason).toMatch(/40 run hours to go/);
    const byDays = dueStatus(oil, { runHoursNow: 1010, now: NOW, lastDoneAt: NOW - 355 * DAY, lastDoneRunHours: 1000 }, 14, 50);
    expect(byDays.state).toBe('due-soon');
    expect(byDays.reason).toMatch(/10 days to the 365-day date/);
    const oneDay = dueStatus(oil, { runHoursNow: 1010, now: NOW, lastDoneAt: NOW - 364 * DAY, lastDoneRunHours: 1000 }, 14, 50);
    expect(oneDay.reason).toMatch(/due soon: 1 day to the 365-day date/);
  });

  it('both limits crossed: the reason names both', () => {
    const s = dueStatus(oil, { runHoursNow: 1300, now: NOW, lastDoneAt: NOW - 400 * DAY, lastDoneRunHours: 1000 });
    expect(s.state).toBe('overdue');
    expect(s.reason).toMatch(/50 run hours past .* and 35 days past/);
  });

  it('exactly at the limit counts as overdue; one hour before is due soon', () => {
    expect(dueStatus(oil, { runHoursNow: 1250, now: NOW, lastDoneAt: NOW, lastDoneRunHours: 1000 }).state).toBe('overdue');
    expect(dueStatus(oil, { runHoursNow: 1249, now: NOW, lastDoneAt: NOW, lastDoneRunHours: 1000 }).state).toBe('due-soon');
    expect(dueStatus(oil, { runHoursNow: 1000, now: NOW + 365 * DAY, lastDoneAt: NOW, lastDoneRunHours: 1000 }).state).toBe('overdue');
  });

  it('a weekly task is due soon only in the last quarter of its week, not all week long', () => {
    const weekly: ServiceTask = { key: 'weekly-inspection', title: 'Weekly inspection', everyDays: 7, basis: 'test' };
    const at = (daysAgo: number) => dueStatus(weekly, { runHoursNow: 0, now: NOW, lastDoneAt: NOW - daysAgo * DAY, lastDoneRunHours: 0 }, 14, 50).state;
    expect(at(1)).toBe('ok');
    expect(at(5)).toBe('ok');
    expect(at(5.5)).toBe('due-soon');
    expect(at(7)).toBe('overdue');
  });

  it('ok well inside both intervals', () => {
    const s = dueStatus(oil, { runHoursNow: 1100, now: NOW, lastDoneAt: NOW - 100 * DAY, lastDoneRunHours: 1000 });
    expect(s.state).toBe('ok');
    expect(s.reason).toBe('150 run hours to go to 1250 h; 265 days to the 365-day date');
  });

  it('never done is overdue; hours unknown at last service falls back to the calendar', () => {
    expect(dueStatus(oil, { runHoursNow: 10, now: NOW, lastDoneAt: null, lastDoneRunHours: null }).state).toBe('overdue');
    const s = dueStatus(oil, { runHoursNow: 5000, now: NOW, lastDoneAt: NOW - 30 * DAY, lastDoneRunHours: null });
    expect(s).toMatchObject({ state: 'ok', dueAtRunHours: null });
    expect(s.reason).toMatch(/calendar only/);
  });
});

describe('default service plan and due list', () => {
  it('standby plan: oil drain, coolant filter at each oil drain, coolant test twice a year, flush placeholder, weekly and monthly checks', () => {
    const plan = defaultServicePlan({ oilDrainIntervalH: 250, duty: 'standby' });
    expect(plan.map((t) => t.key)).toEqual(['oil-drain', 'filter-change', 'coolant-test', 'drain-flush-refill', 'weekly-inspection', 'monthly-exercise']);
    const by = Object.fromEntries(plan.map((t) => [t.key, t]));
    expect(by['filter-change'].everyHours).toBe(by['oil-drain'].everyHours);
    expect(by['coolant-test'].everyDays! * 2).toBeLessThanOrEqual(365);
    expect(by['drain-flush-refill']).toMatchObject({ everyHours: 3000, everyDays: 730, placeholder: true });
    expect(by['weekly-inspection'].basis).toMatch(/NFPA 110 chapter 8/);
    expect(defaultServicePlan({ oilDrainIntervalH: 500, duty: 'prime' }).map((t) => t.key)).not.toContain('weekly-inspection');
  });

  it('sorts overdue first, then due soon, then ok by date', () => {
    const plan = defaultServicePlan({ oilDrainIntervalH: 250, duty: 'standby' });
    const list = dueList(
      plan,
      {
        'oil-drain': { lastDoneAt: NOW - 200 * DAY, lastDoneRunHours: 900 },
        'filter-change': { lastDoneAt: NOW - 200 * DAY, lastDoneRunHours: 900 },
        'coolant-test': { lastDoneAt: NOW - 190 * DAY, lastDoneRunHours: 900 },
        'drain-flush-refill': { lastDoneAt: NOW - 300 * DAY, lastDoneRunHours: 800 },
        'weekly-inspection': { lastDoneAt: NOW - 6 * DAY, lastDoneRunHours: 940 },
        // monthly-exercise: never recorded
      },
      { runHoursNow: 960, now: NOW },
    );
    expect(list.map((e) => [e.task.key, e.state])).toEqual([
      ['coolant-test', 'overdue'], // 190 days > 182
      ['monthly-exercise', 'overdue'],
      ['weekly-inspection', 'due-soon'], // 1 day left, inside a quarter of its 7-day interval
      ['filter-change', 'ok'], // same date as the oil drain: by key
      ['oil-drain', 'ok'],
      ['drain-flush-refill', 'ok'],
    ]);
  });
});
