/**
 * Service plan and due list: recurring tasks by run hours and/or calendar days, due at
 * whichever comes first. Calendar intervals are counted in days of 24 h from the time the task
 * was last done (UTC, no time-zone effects).
 */

export interface ServiceTask {
  key: string;
  title: string;
  everyHours?: number | null;
  everyDays?: number | null;
  /** A default that must be replaced by the engine maker's figure. */
  placeholder?: boolean;
  /** Where the interval comes from. */
  basis: string;
}

export interface TaskRecord {
  lastDoneAt: number | null;
  lastDoneRunHours: number | null;
}

export interface DueContext extends TaskRecord {
  runHoursNow: number;
  now: number;
}

export type DueState = 'overdue' | 'due-soon' | 'ok';

export interface DueStatus {
  state: DueState;
  dueAt: number | null;
  dueAtRunHours: number | null;
  reason: string;
}

export interface DueListEntry extends DueStatus {
  task: ServiceTask;
}

const DAY = 86_400_000;
const isNum = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v) && v > 0;

export function dueStatus(task: ServiceTask, ctx: DueContext, windowDays = 14, windowHours = 50): DueStatus {
  const byHours = isNum(task.everyHours);
  const byDays = isNum(task.everyDays);
  if (!byHours && !byDays) return { state: 'ok', dueAt: null, dueAtRunHours: null, reason: 'no interval set' };
  if (ctx.lastDoneAt === null) return { state: 'overdue', dueAt: null, dueAtRunHours: null, reason: 'no record of it being done' };

  // A short task must not sit in "due soon" for its whole interval: the window is at most a quarter of it.
  const soonDays = byDays ? Math.min(windowDays, task.everyDays! / 4) : windowDays;
  const soonHours = byHours ? Math.min(windowHours, task.everyHours! / 4) : windowHours;
  const dueAt = byDays ? ctx.lastDoneAt + task.everyDays! * DAY : null;
  const dueAtRunHours = byHours && ctx.lastDoneRunHours !== null ? ctx.lastDoneRunHours + task.everyHours! : null;
  const daysLeft = dueAt === null ? Infinity : (dueAt - ctx.now) / DAY;
  const hoursLeft = dueAtRunHours === null ? Infinity : dueAtRunHours - ctx.runHoursNow;
  const noHours = byHours && ctx.lastDoneRunHours === null ? ' (run hours when last done not recorded: calendar only)' : '';
  const hoursText = dueAtRunHours === null ? '' : `${Math.abs(round1(hoursLeft))} run hours ${hoursLeft <= 0 ? 'past' : 'to go to'} ${round1(dueAtRunHours)} h`;
  const days = Math.abs(round1(daysLeft));
  const daysText = dueAt === null ? '' : `${days} ${days === 1 ? 'day' : 'days'} ${daysLeft <= 0 ? 'past' : 'to'} the ${task.everyDays}-day date`;

  if (hoursLeft <= 0 || daysLeft <= 0) {
    const why = [hoursLeft <= 0 ? hoursText : '', daysLeft <= 0 ? daysText : ''].filter(Boolean).join(' and ');
    return { state: 'overdue', dueAt, dueAtRunHours, reason: `overdue: ${why}${noHours}` };
  }
  if (hoursLeft <= soonHours || daysLeft <= soonDays) {
    const why = [hoursLeft <= soonHours ? hoursText : '', daysLeft <= soonDays ? daysText : ''].filter(Boolean).join(' and ');
    return { state: 'due-soon', dueAt, dueAtRunHours, reason: `due soon: ${why}${noHours}` };
  }
  const first = hoursText && daysText ? `${hoursText}; ${daysText}` : hoursText || daysText;
  return { state: 'ok', dueAt, dueAtRunHours, reason: `${first}${noHours}` };
}

const round1 = (n: number) => Math.round(n * 10) / 10;
const RANK: Record<DueState, number> = { overdue: 0, 'due-soon': 1, ok: 2 };

/** Every task's status, overdue first, then due soon, then by date (tasks without a date last within a group). */
export function dueList(
  tasks: readonly ServiceTask[],
  records: Readonly<Record<string, TaskRecord | undefined>>,
  now: { runHoursNow: number; now: number },
  windowDays = 14,
  windowHours = 50,
): DueListEntry[] {
  return tasks
    .map((task) => {
      const rec = records[task.key] ?? { lastDoneAt: null, lastDoneRunHours: null };
      return { task, ...dueStatus(task, { ...rec, ...now }, windowDays, windowHours) };
    })
    .sort((a, b) => RANK[a.state] - RANK[b.state] || (a.dueAt ?? Infinity) - (b.dueAt ?? Infinity) || a.task.key.localeCompare(b.task.key));
}

export interface PlanEngine {
  oilDrainIntervalH: number;
  duty: 'standby' | 'prime' | 'continuous';
  /** Extended-life coolant adds the extender task and makes the coolant test a lab analysis. */
  coolantFamily?: 'conventional' | 'extended-life';
  /** The administrator's extender interval; the common-practice default (a placeholder) when absent. */
  extender?: { everyHours: number | null; everyDays: number | null } | null;
}

/**
 * Extended-life coolant extender: common practice (from memory) is one dose of extender about midway through
 * the coolant's service life, often quoted as 6000 h or 3 years; the coolant maker's interval comes first.
 */
export const DEFAULT_EXTENDER_INTERVAL = Object.freeze({ everyHours: 6000, everyDays: 1095 });

/**
 * Default service plan (common practice; replace with the engine maker's schedule):
 * oil drain at the engine's interval in hours or yearly; coolant filter at each oil drain;
 * coolant test every 6 months and at every oil drain (at least twice a year); drain, flush and
 * refill at 3000 h or 2 years (placeholder); for standby sets a weekly inspection and a monthly
 * exercise in the spirit of NFPA 110 chapter 8.
 */
export function defaultServicePlan(engine: PlanEngine): ServiceTask[] {
  const h = engine.oilDrainIntervalH;
  const tasks: ServiceTask[] = [
    { key: 'oil-drain', title: 'Oil drain and oil filter', everyHours: h, everyDays: 365, basis: 'engine oil-drain interval, or yearly (common practice)' },
    {
      key: 'filter-change',
      title: 'Coolant filter change (charged or blank per the additive test)',
      everyHours: h,
      everyDays: 365,
      basis: 'at each oil drain (common practice)',
    },
    {
      key: 'coolant-test',
      title: 'Coolant test: additive, glycol, freeze point, pH, conductivity',
      everyHours: h,
      everyDays: 182,
      basis: 'at least twice a year and at every service (common practice)',
    },
    {
      key: 'drain-flush-refill',
      title: 'Drain, flush and refill cooling system',
      everyHours: 3000,
      everyDays: 730,
      placeholder: true,
      basis: "placeholder default; use the engine and coolant maker's interval",
    },
  ];
  if (engine.coolantFamily === 'extended-life') {
    const test = tasks.find((t) => t.key === 'coolant-test')!;
    test.title = 'Coolant lab analysis (extended-life coolant: test strips do not apply)';
    const set = engine.extender ?? null;
    tasks.push(
      set
        ? {
            key: 'coolant-extender',
            title: 'Add extended-life coolant extender',
            everyHours: set.everyHours,
            everyDays: set.everyDays,
            basis: "set by the administrator (from the coolant maker's literature)",
          }
        : {
            key: 'coolant-extender',
            title: 'Add extended-life coolant extender',
            ...DEFAULT_EXTENDER_INTERVAL,
            placeholder: true,
            basis: "common practice (from memory): about midway through the coolant's life; use the coolant maker's interval",
          },
    );
  }
  if (engine.duty === 'standby') {
    tasks.push(
      {
        key: 'weekly-inspection',
        title: 'Weekly inspection (coolant level, heater, leaks, hoses)',
        everyDays: 7,
        basis: 'in the spirit of NFPA 110 chapter 8 (weekly inspection)',
      },
      {
        key: 'monthly-exercise',
        title: 'Monthly exercise under load (30 min)',
        everyDays: 30,
        basis: "in the spirit of NFPA 110 chapter 8 (monthly exercise, 30 min at >= 30 % load or the maker's minimum exhaust temperature)",
      },
    );
  }
  return tasks;
}
