/**
 * Demo coolant history, invented for the demo and fixed (no randomness): an additive profile with made-up
 * figures, service events so the due list shows a mix of ok, due soon and overdue, and a few past coolant tests
 * per engine for the history charts. Times are counted back from the seed time, so the mix holds on any day.
 */
import type { Transaction } from 'sequelize';
import { assessFreezeProtection } from '../shared/coolant';
import type { Engine, Models } from '../server/models';
import { decideForTest } from '../server/services/coolant/coolant-tests';

const DAY = 86_400_000;

/** Invented figures, not any product's label: a real site enters its own from the additive and filter labels. */
export const DEMO_ADDITIVE_PROFILE = {
  name: 'Demo additive (invented figures, not a real label)',
  liquidUnitsPerLitre: 2.1,
  filterSizes: [
    { label: 'Demo charged filter, small', prechargeUnits: 4 },
    { label: 'Demo charged filter, medium', prechargeUnits: 8 },
    { label: 'Demo charged filter, large', prechargeUnits: 15 },
  ],
  scaLow: 1.2,
  scaHigh: 3.0,
};

/** [task key, days ago, run hours before the engine's present count]. */
type EventRow = [string, number, number];

/**
 * Per demo engine (by name). Intervals are the default plan's: oil drain and coolant filter at the engine's
 * oil-drain hours or yearly, coolant test every 182 days, drain-flush-refill 3000 h or 730 days, weekly and
 * monthly checks on standby sets. The comment says what the due list shows with the 14-day window.
 */
export const DEMO_SERVICE_HISTORY: Record<string, EventRow[]> = {
  // filter and oil drain 10 h before their 250 h interval: due soon (the technician's low test lands here)
  'Works gen-set A': [
    ['oil-drain', 300, 240],
    ['filter-change', 300, 240],
    ['drain-flush-refill', 400, 900],
    ['weekly-inspection', 3, 0],
    ['monthly-exercise', 12, 0],
  ],
  // all in order
  'Works gen-set B': [
    ['oil-drain', 100, 200],
    ['filter-change', 100, 200],
    ['drain-flush-refill', 200, 400],
    ['weekly-inspection', 2, 0],
    ['monthly-exercise', 10, 0],
  ],
  // neglected: yearly oil drain and filter, weekly and monthly checks overdue by calendar
  'Fire-pump engine': [
    ['oil-drain', 380, 6],
    ['filter-change', 380, 6],
    ['drain-flush-refill', 500, 10],
    ['weekly-inspection', 9, 0],
    ['monthly-exercise', 35, 0],
  ],
  'Ridgeback gen-set 1': [
    ['oil-drain', 120, 100],
    ['filter-change', 120, 100],
    ['drain-flush-refill', 300, 300],
    ['weekly-inspection', 1, 0],
    ['monthly-exercise', 8, 0],
  ],
  // yearly date 10 days off: due soon by calendar
  'Ridgeback gen-set 2': [
    ['oil-drain', 355, 30],
    ['filter-change', 355, 30],
    ['drain-flush-refill', 600, 200],
    ['weekly-inspection', 5, 0],
    ['monthly-exercise', 28, 0],
  ],
  // runs all the time: 20 h past its 500 h oil drain and filter, overdue by hours
  'Booster pump engine': [
    ['oil-drain', 22, 520],
    ['filter-change', 22, 520],
    ['drain-flush-refill', 100, 2400],
  ],
  'Intake gen-set north': [
    ['oil-drain', 60, 150],
    ['filter-change', 60, 150],
    ['drain-flush-refill', 400, 1500],
    ['weekly-inspection', 4, 0],
    ['monthly-exercise', 10, 0],
  ],
  'Intake gen-set south': [
    ['oil-drain', 200, 100],
    ['filter-change', 200, 100],
    ['drain-flush-refill', 100, 40],
    ['weekly-inspection', 6, 0],
    ['monthly-exercise', 15, 0],
  ],
};

interface PastTest {
  daysAgo: number;
  sca: number | null;
  glycol: number;
  ph: number;
  ec: number;
}

/** Past tests per engine, oldest first (invented readings; the freeze point follows the glycol from the table). */
export const DEMO_TEST_HISTORY: Record<string, PastTest[]> = {
  'Works gen-set A': [
    { daysAgo: 700, sca: 1.8, glycol: 50, ph: 9.6, ec: 2400 },
    { daysAgo: 520, sca: 1.5, glycol: 49, ph: 9.4, ec: 2600 },
    { daysAgo: 330, sca: 1.3, glycol: 48, ph: 9.2, ec: 2900 },
    { daysAgo: 150, sca: 1.1, glycol: 48, ph: 9.0, ec: 3100 },
  ],
  'Works gen-set B': [
    { daysAgo: 420, sca: null, glycol: 50, ph: 8.4, ec: 3300 },
    { daysAgo: 240, sca: null, glycol: 50, ph: 8.3, ec: 3400 },
    { daysAgo: 60, sca: null, glycol: 49, ph: 8.3, ec: 3500 },
  ],
  'Fire-pump engine': [
    { daysAgo: 560, sca: 2.2, glycol: 45, ph: 9.8, ec: 2200 },
    { daysAgo: 380, sca: 1.9, glycol: 44, ph: 9.5, ec: 2500 },
    { daysAgo: 200, sca: 1.4, glycol: 42, ph: 9.1, ec: 2800 },
  ],
  'Ridgeback gen-set 1': [
    { daysAgo: 460, sca: 2.6, glycol: 51, ph: 9.9, ec: 2100 },
    { daysAgo: 280, sca: 3.4, glycol: 50, ph: 10.0, ec: 2300 },
    { daysAgo: 100, sca: 2.4, glycol: 50, ph: 9.7, ec: 2400 },
  ],
  'Ridgeback gen-set 2': [
    { daysAgo: 535, sca: 1.6, glycol: 46, ph: 9.5, ec: 2500 },
    { daysAgo: 355, sca: 1.7, glycol: 45, ph: 9.4, ec: 2600 },
    { daysAgo: 175, sca: 1.4, glycol: 45, ph: 9.3, ec: 2700 },
  ],
  'Booster pump engine': [
    { daysAgo: 380, sca: 2.0, glycol: 41, ph: 9.4, ec: 2800 },
    { daysAgo: 200, sca: 1.7, glycol: 40, ph: 9.2, ec: 3000 },
    { daysAgo: 22, sca: 1.5, glycol: 40, ph: 9.1, ec: 3200 },
  ],
  'Intake gen-set north': [
    { daysAgo: 450, sca: 2.1, glycol: 48, ph: 9.6, ec: 2300 },
    { daysAgo: 270, sca: 2.0, glycol: 48, ph: 9.5, ec: 2400 },
    { daysAgo: 90, sca: 1.9, glycol: 47, ph: 9.4, ec: 2500 },
  ],
  'Intake gen-set south': [
    { daysAgo: 530, sca: 1.9, glycol: 46, ph: 9.5, ec: 2300 },
    { daysAgo: 350, sca: 1.8, glycol: 45, ph: 9.4, ec: 2400 },
    { daysAgo: 170, sca: 1.6, glycol: 45, ph: 9.3, ec: 2500 },
  ],
};

export interface CoolantDemoResult {
  events: number;
  tests: number;
}

/** Demo additive profile, service events and past coolant tests for the demo engines (seed time = `now`). */
export async function seedCoolantDemo(models: Models, engines: Engine[], opts: { transaction?: Transaction; now?: number } = {}): Promise<CoolantDemoResult> {
  const { transaction } = opts;
  const now = opts.now ?? Date.now();
  const admin = await models.User.findOne({ where: { role: 'admin' }, transaction });
  const tech = await models.User.findOne({ where: { role: 'technician' }, transaction });
  await models.AdditiveProfile.create({ ...DEMO_ADDITIVE_PROFILE, updatedBy: admin?.id ?? null }, { transaction });
  const limits = { low: DEMO_ADDITIVE_PROFILE.scaLow, high: DEMO_ADDITIVE_PROFILE.scaHigh };

  const events = engines.flatMap((e) =>
    (DEMO_SERVICE_HISTORY[e.name] ?? []).map(([taskKey, daysAgo, hoursBefore]) => ({
      engineId: e.id,
      taskKey,
      doneAt: new Date(now - daysAgo * DAY),
      runHours: Math.max(0, e.runHours - hoursBefore),
      workOrderId: null,
    })),
  );
  await models.ServiceEvent.bulkCreate(events, { transaction });

  const tests = engines.flatMap((e) =>
    (DEMO_TEST_HISTORY[e.name] ?? []).map((t) => {
      const freeze = assessFreezeProtection(e.glycolType, t.glycol, 'volume').freezePointC;
      const reading = { scaUnitsPerGal: t.sca, glycolPercent: t.glycol, freezePointC: freeze === null ? null : Math.round(freeze) };
      const lab = e.coolantFamily === 'extended-life';
      return {
        engineId: e.id,
        testedAt: new Date(now - t.daysAgo * DAY),
        method: lab ? ('lab' as const) : ('strip' as const),
        ...reading,
        ph: t.ph,
        conductivityUsCm: t.ec,
        appearance: 'clear',
        notes: 'demo history',
        testedBy: tech?.id ?? null,
        decision: decideForTest(e, reading, limits) as unknown as Record<string, unknown>,
        source: lab ? ('lab-import' as const) : ('manual' as const),
      };
    }),
  );
  await models.CoolantTest.bulkCreate(tests, { transaction });
  return { events: events.length, tests: tests.length };
}
