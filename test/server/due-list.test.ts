/**
 * The due list on a fixed clock (computeDueList takes `now`), on a real SQLite file, with run-hour and
 * calendar intervals crossing: whichever comes first decides. Intervals are the default plan's
 * (common practice: coolant filter at each oil drain or yearly; coolant test twice a year) and NFPA 110
 * chapter 8 in spirit for the weekly inspection of standby sets. Also the run-hours counter on speed readings.
 */
import request from 'supertest';
import { createLogger } from '../../server/logger';
import { RunHoursCounter } from '../../server/services/coolant/run-hours';
import { computeDueList, workKindFor } from '../../server/services/coolant/service-plan';
import { WORK_TEMPLATES } from '../../server/services/work-templates';
import { defaultServicePlan } from '../../shared/service/due-list';
import { auth, makeTestApp, type TestApp } from './helpers';

const DAY = 86_400_000;
const NOW = Date.UTC(2026, 5, 1, 12); // 1 June 2026 12:00 UTC
let t: TestApp;
let siteId: number;
let hoursFirst: number; // reaches the hour interval before the calendar date
let daysFirst: number; // reaches the calendar date before the hour interval
let prime: number;
beforeAll(async () => {
  t = await makeTestApp();
  siteId = (await t.ctx.models.Site.create({ name: 'Hill reservoir', timeZone: 'UTC' })).id;
  const base = {
    siteId,
    capacityL: 80,
    coolantFamily: 'conventional' as const,
    glycolType: 'ethylene' as const,
    glycolPercent: 50,
    capPressureKpa: 100,
    oilDrainIntervalH: 250,
  };
  hoursFirst = (await t.ctx.models.Engine.create({ ...base, name: 'A busy set', duty: 'prime', runHours: 1260 })).id;
  daysFirst = (await t.ctx.models.Engine.create({ ...base, name: 'B quiet set', duty: 'standby', runHours: 40 })).id;
  prime = (await t.ctx.models.Engine.create({ ...base, name: 'C fresh set', duty: 'prime', runHours: 500 })).id;
  const ev = (engineId: number, taskKey: string, daysAgo: number, runHours: number) =>
    t.ctx.models.ServiceEvent.create({ engineId, taskKey, doneAt: new Date(NOW - daysAgo * DAY), runHours, workOrderId: null });
  // A: filter changed 30 days ago at 1000 h; 250 h interval -> due at 1250 h, now 1260 h: overdue by hours while the yearly date is far off
  await ev(hoursFirst, 'filter-change', 30, 1000);
  // B: filter changed 360 days ago at 30 h; 40 h now -> hours far off, yearly date in 5 days: due soon by calendar
  await ev(daysFirst, 'filter-change', 360, 30);
  // B: weekly inspection 8 days ago: overdue by calendar
  await ev(daysFirst, 'weekly-inspection', 8, 39);
  // C: everything done yesterday at 500 h except the filter, done at 470 h (20 h to go: due soon by hours)
  for (const k of ['oil-drain', 'coolant-test', 'drain-flush-refill']) await ev(prime, k, 1, 500);
  await ev(prime, 'filter-change', 1, 470);
  // an event after `now` must not count
  await ev(prime, 'oil-drain', -3, 600);
});
afterAll(() => t.close());

const entry = async (engineId: number, taskKey: string, windowDays = 14) => {
  const out = await computeDueList(t.ctx.models, { windowDays, includeOk: true, now: NOW });
  return out.sites.flatMap((s) => s.entries).find((e) => e.engineId === engineId && e.taskKey === taskKey)!;
};

describe('due list on a fixed clock', () => {
  it('one name per task: plan task key = work-order kind = the service event its template writes', () => {
    const plan = defaultServicePlan({ oilDrainIntervalH: 250, duty: 'standby' });
    const withTemplate = plan.filter((p) => workKindFor(p.key)).map((p) => p.key);
    // every task of the plan (standby duty has them all) has its own template
    expect(withTemplate).toEqual(plan.map((p) => p.key));
    expect(withTemplate).toEqual(
      expect.arrayContaining(['oil-drain', 'filter-change', 'coolant-test', 'drain-flush-refill', 'weekly-inspection', 'monthly-exercise']),
    );
    for (const k of withTemplate) expect(WORK_TEMPLATES.find((w) => w.kind === k)?.serviceTask).toBe(k);
    for (const w of WORK_TEMPLATES) if (w.serviceTask) expect(plan.some((p) => p.key === w.serviceTask)).toBe(true);
    expect(workKindFor('paint-the-skid')).toBeNull();
  });

  it('every entry of GET /api/due-list has a workKind, and every due task creates its work order', async () => {
    const res = await request(t.app).get('/api/due-list?include=all&windowDays=365').set(auth(t.tokens.planner)).expect(200);
    const entries: Array<{ engineId: number; taskKey: string; workKind: string | null }> = (res.body.sites ?? res.body).flatMap(
      (s: { entries: unknown[] }) => s.entries,
    );
    expect(entries.length).toBe(14); // two prime sets with 4 tasks, one standby set with 6
    const tasks = new Set(entries.map((e) => e.taskKey));
    for (const k of ['oil-drain', 'filter-change', 'coolant-test', 'drain-flush-refill', 'weekly-inspection', 'monthly-exercise'])
      expect(tasks.has(k)).toBe(true);
    for (const e of entries) expect({ task: e.taskKey, workKind: typeof e.workKind }).toEqual({ task: e.taskKey, workKind: 'string' });
    const kinds = new Map<string, { engineId: number; workKind: string }>();
    for (const e of entries) kinds.set(e.workKind!, { engineId: e.engineId, workKind: e.workKind! });
    for (const e of kinds.values()) {
      const wo = await request(t.app)
        .post('/api/work-orders')
        .set(auth(t.tokens.planner))
        .send({ engineId: e.engineId, kind: e.workKind, assigneeId: t.userIds.technician, dueDate: '2026-06-08' })
        .expect(201);
      expect(wo.body.kind).toBe(e.workKind);
      expect(wo.body.steps.length).toBeGreaterThanOrEqual(4);
    }
    // a task this engine's plan added (no template of its own) is a general repair
    await request(t.app)
      .put(`/api/engines/${prime}/service-plan/belt-guard-check`)
      .set(auth(t.tokens.planner))
      .send({ title: 'Belt guard check', everyDays: 30 });
    const again = await request(t.app).get('/api/due-list?include=all&windowDays=365').set(auth(t.tokens.planner)).expect(200);
    for (const e of (again.body.sites ?? again.body).flatMap((s: { entries: Array<{ workKind: unknown }> }) => s.entries))
      expect(typeof e.workKind).toBe('string');
  });

  it('the drain-flush-refill refills to a 50/50 mix and adds the initial additive charge as steps; the weekly inspection and monthly exercise carry their cooling items', () => {
    const dfr = WORK_TEMPLATES.find((w) => w.kind === 'drain-flush-refill')!;
    expect(dfr.steps.find((s) => s.key === 'refill')!.title).toMatch(/50\/50/);
    expect(dfr.steps.some((s) => s.key === 'initial-charge')).toBe(true);
    const weekly = WORK_TEMPLATES.find((w) => w.kind === 'weekly-inspection')!.steps.map((s) => s.key);
    expect(weekly).toEqual(expect.arrayContaining(['coolant-level', 'heater-working', 'hoses', 'belts', 'leaks', 'records']));
    const monthly = WORK_TEMPLATES.find((w) => w.kind === 'monthly-exercise')!.steps.map((s) => s.key);
    expect(monthly).toEqual(expect.arrayContaining(['run-time', 'load', 'coolant-temp-under-load']));
  });

  it('hours first: 1000 h + 250 h = 1250 h < 1260 h now -> overdue, though the yearly date is 335 days off', async () => {
    const e = await entry(hoursFirst, 'filter-change');
    expect(e.state).toBe('overdue');
    expect(e.dueAtRunHours).toBe(1250);
    expect(e.dueAt).toBe(new Date(NOW + 335 * DAY).toISOString());
    expect(e.lastDoneRunHours).toBe(1000);
    expect(e.workKind).toBe('filter-change');
  });

  it('calendar first: done 360 days ago -> yearly date in 5 days: due soon with a 14-day window, ok with a 3-day one', async () => {
    expect((await entry(daysFirst, 'filter-change', 14)).state).toBe('due-soon');
    const narrow = await entry(daysFirst, 'filter-change', 3);
    expect(narrow.state).toBe('ok');
    expect(narrow.dueAtRunHours).toBe(280);
  });

  it('weekly inspection 8 days ago is overdue (7-day interval); never-done tasks are overdue', async () => {
    expect((await entry(daysFirst, 'weekly-inspection')).state).toBe('overdue');
    expect((await entry(daysFirst, 'coolant-test')).reason).toMatch(/no record/);
  });

  it('hours within the 50 h window: 470 h + 250 h = 720 h, 500 h now -> 220 h to go: ok; an event after now is ignored', async () => {
    const f = await entry(prime, 'filter-change');
    expect(f.state).toBe('ok');
    expect(f.dueAtRunHours).toBe(720);
    const oil = await entry(prime, 'oil-drain');
    expect(oil.lastDoneRunHours).toBe(500);
  });

  it('a recorded coolant test counts for the coolant-test task (calendar)', async () => {
    await t.ctx.models.CoolantTest.create({
      engineId: daysFirst,
      testedAt: new Date(NOW - 10 * DAY),
      method: 'strip',
      scaUnitsPerGal: 2,
      glycolPercent: null,
      freezePointC: null,
      ph: null,
      conductivityUsCm: null,
      appearance: null,
      notes: null,
      testedBy: null,
      decision: null,
      source: 'manual',
    });
    const e = await entry(daysFirst, 'coolant-test');
    expect(e.state).toBe('ok');
    expect(e.dueAt).toBe(new Date(NOW + 172 * DAY).toISOString()); // 182-day interval
  });

  it('an override changes the interval; disabled tasks leave the list; only due entries by default, counted per site', async () => {
    await request(t.app).put(`/api/engines/${hoursFirst}/service-plan/filter-change`).set(auth(t.tokens.technician)).send({ everyHours: 500 }).expect(403);
    await request(t.app).put(`/api/engines/${hoursFirst}/service-plan/filter-change`).set(auth(t.tokens.planner)).send({ everyHours: 500 }).expect(200);
    const e = await entry(hoursFirst, 'filter-change');
    expect(e.state).toBe('ok'); // 1000 + 500 = 1500 h
    expect(e.basis).toBe('set for this engine');
    await request(t.app).put(`/api/engines/${daysFirst}/service-plan/weekly-inspection`).set(auth(t.tokens.planner)).send({ disabled: true }).expect(200);
    const out = await computeDueList(t.ctx.models, { windowDays: 14, now: NOW });
    const entries = out.sites[0].entries;
    expect(entries.every((x) => x.state !== 'ok')).toBe(true);
    expect(entries.some((x) => x.taskKey === 'weekly-inspection')).toBe(false);
    expect(out.sites[0].overdue).toBe(entries.filter((x) => x.state === 'overdue').length);
    expect(entries[0].state).toBe('overdue');
    await request(t.app).delete(`/api/engines/${hoursFirst}/service-plan/filter-change`).set(auth(t.tokens.planner)).expect(200);
    expect((await entry(hoursFirst, 'filter-change')).state).toBe('overdue');
  });

  it('the route answers for every role and validates its query', async () => {
    const res = await request(t.app).get(`/api/due-list?siteId=${siteId}&windowDays=30`).set(auth(t.tokens.operator)).expect(200);
    expect(res.body.sites[0].siteName).toBe('Hill reservoir');
    expect((await request(t.app).get('/api/due-list?windowDays=-1').set(auth(t.tokens.planner)).expect(400)).body.field).toBe('windowDays');
  });
});

describe('run-hours counter', () => {
  it('counts time between good speed readings while at or above 100 rpm, skips gaps over 5 min, writes one increment (hand-computed minutes)', async () => {
    const engine = await t.ctx.models.Engine.findByPk(prime);
    const start = engine!.runHours;
    const c = new RunHoursCounter(t.ctx.models, createLogger('error'));
    const s = (ts: number, value: number, quality: 0 | 1 = 0) => ({ engineId: prime, channel: 'engine_speed' as const, ts, value, quality });
    const t0 = NOW;
    const min = 60_000;
    c.onReadings(Array.from({ length: 61 }, (_, i) => s(t0 + i * min, 1800))); // 60 min running, a reading a minute
    c.onReadings([s(t0 + 90 * min, 1800)]); // a 30-min gap: not counted (could have stopped)
    c.onReadings([s(t0 + 93 * min, 1800), s(t0 + 96 * min, 0)]); // 3 + 3 min while it was running, then stopped
    c.onReadings([s(t0 + 99 * min, 0), s(t0 + 100 * min, 1800)]); // stopped time does not count
    c.onReadings([s(t0 + 124 * min, 1800)]); // 24-min gap: not counted
    c.onReadings([s(t0 + 125 * min, 5000, 1), s(t0 + 110 * min, 1800)]); // bad quality and late samples ignored
    c.onReadings([s(t0 + 148 * min, 1800), s(t0 + 125 * min, 90)]); // late: ignored; 24-min gap: not counted
    c.onReadings(Array.from({ length: 25 }, (_, i) => s(t0 + (149 + i) * min, i < 24 ? 1800 : 99))); // 1 + 24 min (the last at 99 rpm ends it)
    c.onReadings([s(t0 + 175 * min, 2000)]); // from a 99 rpm reading: not running, not counted
    c.onReadings([{ engineId: prime, channel: 'coolant_temp', ts: t0 + 200 * 60_000, value: 80, quality: 0 }]);
    expect(c.pendingHours(prime)).toBeCloseTo((60 + 6 + 25) / 60, 9); // RUNNING_RPM = 100 (shared/channels.ts)
    await c.stop();
    expect((await t.ctx.models.Engine.findByPk(prime))!.runHours).toBeCloseTo(start + 91 / 60, 9);
    expect(c.pendingHours(prime)).toBe(0);
  });
});

describe('a task the engine plan added, done as a general repair from the due list', () => {
  type Step = { id: number; key: string; optional: boolean; input: string };
  it('the order carries the task; completing it records the task done, so the due list shows it done and not due', async () => {
    await request(t.app)
      .put(`/api/engines/${daysFirst}/service-plan/louvre-check`)
      .set(auth(t.tokens.planner))
      .send({ title: 'Radiator louvre check', everyDays: 90 })
      .expect(200);
    const dueRow = async () => {
      const res = await request(t.app).get('/api/due-list?include=all&windowDays=14').set(auth(t.tokens.planner)).expect(200);
      return (res.body.sites as Array<{ entries: Array<Record<string, unknown>> }>)
        .flatMap((s) => s.entries)
        .find((e) => e.engineId === daysFirst && e.taskKey === 'louvre-check')!;
    };
    const before = await dueRow();
    expect(before).toMatchObject({ state: 'overdue', workKind: 'general-repair', lastDoneAt: null, openWorkOrderId: null });

    // bad links are refused, naming the field
    const bad = (body: object) =>
      request(t.app)
        .post('/api/work-orders')
        .set(auth(t.tokens.planner))
        .send({ engineId: daysFirst, assigneeId: t.userIds.technician, ...body });
    expect((await bad({ kind: 'general-repair', serviceTaskKey: 'no-such-task' }).expect(400)).body.field).toBe('serviceTaskKey');
    expect((await bad({ kind: 'leak-check', serviceTaskKey: 'louvre-check' }).expect(400)).body.field).toBe('kind');
    // an unrelated general repair on the same engine is not taken for the task's open order
    await bad({ kind: 'general-repair', title: 'Loose cable tie' }).expect(201);
    expect((await dueRow()).openWorkOrderId).toBeNull();

    const created = await bad({ kind: 'general-repair', serviceTaskKey: 'louvre-check', title: 'Radiator louvre check: B quiet set' }).expect(201);
    expect(created.body.serviceTaskKey).toBe('louvre-check');
    expect((await dueRow()).openWorkOrderId).toBe(created.body.id);

    const base = `/api/work-orders/${created.body.id}`;
    await request(t.app).post(`${base}/transition`).set(auth(t.tokens.technician)).send({ to: 'in-progress' }).expect(200);
    for (const s of created.body.steps as Step[]) {
      if (s.optional) continue;
      await request(t.app).post(`${base}/steps/${s.id}/complete`).set(auth(t.tokens.technician)).send({ note: 'louvres free, linkage greased' }).expect(200);
    }
    await request(t.app).post(`${base}/transition`).set(auth(t.tokens.technician)).send({ to: 'waiting-sign-off' }).expect(200);
    const event = await t.ctx.models.ServiceEvent.findOne({ where: { engineId: daysFirst, taskKey: 'louvre-check' } });
    expect(event?.workOrderId).toBe(created.body.id);
    const after = await dueRow();
    expect(after).toMatchObject({ state: 'ok', openWorkOrderId: created.body.id });
    expect(after.lastDoneAt).not.toBeNull();
  });
});
