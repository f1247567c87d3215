/**
 * Work orders over HTTP against a real SQLite file: roles and transitions, the server-side opening
 * check on gated steps (the client is bypassed: these tests call the API directly), the manual check,
 * attachments, and what completion resets.
 *
 * Limits used by the opening check come from shared/work/opening-check.ts: open only at or below about
 * 50 °C and at about zero gauge pressure (common guidance of the trade, see
 * /work/shared/reference/coolant-references.md "Cooling down"), stored energy relieved first
 * (OSHA 29 CFR 1910.147(d)(5)). The cool-down curves fed here follow Newton's law of cooling
 * T(t) = Ta + (T0 - Ta) e^(-t/tau) (Incropera et al., Fundamentals of Heat and Mass Transfer, ch. 5).
 */
import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { CHANNELS, type ChannelKey } from '../../shared/channels';
import { MemoryLiveState } from '../../server/telemetry/live-state';
import type { AcceptedReading } from '../../server/telemetry/types';
import { auth, makeTestApp, type TestApp } from './helpers';
import { openingHistoryOf } from '../../server/services/work-orders/reading-history';
import { until } from './support/until';

let t: TestApp;
let engineId: number;
let siteId: number;
let coldEngineId: number;
let staleEngineId: number;
let otherTechToken: string;
const listeners: Array<(r: AcceptedReading[]) => void> = [];
const live = new MemoryLiveState();
const emitted: Array<{ room: string | string[]; event: string; payload: unknown }> = [];

/** Readings enter as the ingest hands them on: stored in SQLite (as the writer does), live state, then every onReadings listener. */
async function feed(readings: AcceptedReading[]): Promise<void> {
  for (let i = 0; i < readings.length; i += 200) {
    const chunk = readings.slice(i, i + 200);
    await t.ctx.sequelize.query(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${chunk.map(() => '(?,?,?,?,?)').join(',')}`, {
      replacements: chunk.flatMap((r) => [r.engineId, CHANNELS[r.channel].code, r.ts, r.value, r.quality]),
    });
  }
  live.applyAll(readings, Date.now());
  for (const l of listeners) l(readings);
}

const MIN = 60_000;
/** A run, then a stop and a Newton cool-down: 1 sample / 10 s from `fromMin` to `toMin` minutes relative to now. */
function history(
  id: number,
  o: { stopAtMin: number; fromMin: number; toMin?: number; T0?: number; Ta?: number; tauS?: number; pressureTauS?: number; cond?: number },
): AcceptedReading[] {
  const now = Date.now();
  const out: AcceptedReading[] = [];
  const T0 = o.T0 ?? 85,
    Ta = o.Ta ?? 25,
    tau = o.tauS ?? 900,
    ptau = o.pressureTauS ?? 300;
  for (let ts = now + o.fromMin * MIN; ts <= now + (o.toMin ?? 0) * MIN; ts += 10_000) {
    const sinceStop = (ts - (now + o.stopAtMin * MIN)) / 1000;
    const running = sinceStop < 0;
    const temp = running ? T0 : Ta + (T0 - Ta) * Math.exp(-sinceStop / tau);
    const pressure = running ? 90 : Math.max(0, 90 * Math.exp(-sinceStop / ptau) - 0.5);
    const values: Partial<Record<ChannelKey, number>> = { coolant_temp: temp, coolant_pressure: pressure, engine_speed: running ? 1800 : 0, ambient_temp: Ta };
    if (o.cond) values.coolant_conductivity = o.cond;
    for (const [channel, value] of Object.entries(values)) out.push({ engineId: id, channel: channel as ChannelKey, ts, value: value!, quality: 0 });
  }
  return out;
}

beforeAll(async () => {
  t = await makeTestApp();
  const { Site, Engine } = t.ctx.models;
  const row = (siteId: number, name: string) => ({
    siteId,
    name,
    duty: 'standby' as const,
    capacityL: 60,
    coolantFamily: 'conventional' as const,
    glycolType: 'ethylene' as const,
    glycolPercent: 50,
    capPressureKpa: 100,
    oilDrainIntervalH: 250,
    runHours: 1234,
  });
  siteId = (await Site.create({ name: 'Test site', timeZone: 'UTC' })).id;
  engineId = (await Engine.create(row(siteId, 'Hot engine'))).id;
  coldEngineId = (await Engine.create(row(siteId, 'Cold engine'))).id;
  staleEngineId = (await Engine.create(row(siteId, 'Quiet engine'))).id;
  t.ctx.telemetry = {
    liveState: live,
    counters: t.ctx.telemetry!.counters,
    onReadings: (l: (r: AcceptedReading[]) => void) => {
      listeners.push(l);
    },
    emit: (room: string | string[], event: string, payload: unknown) => {
      emitted.push({ room, event, payload });
    },
  } as unknown as typeof t.ctx.telemetry;
  // as startServer does: the opening-check history is fed by telemetry
  listeners.push(openingHistoryOf(t.ctx).onReadings);
  const { createUser } = await import('../../server/services/users');
  await createUser(t.ctx.models, { email: 'tech2@example.test', name: 'Second tech', password: 'correct-horse-battery', role: 'technician' }, 4);
  otherTechToken = (await request(t.app).post('/api/auth/login').send({ email: 'tech2@example.test', password: 'correct-horse-battery' }).expect(200)).body
    .token;
});
afterAll(() => t.close());

const as = (role: 'admin' | 'planner' | 'technician' | 'operator') => auth(t.tokens[role]);

async function plannedOrder(
  engine: number,
  kind = 'filter-change',
): Promise<{ id: number; steps: Array<{ id: number; key: string; gated: boolean; input: string; optional: boolean; unit: string | null }> }> {
  const res = await request(t.app)
    .post('/api/work-orders')
    .set(as('planner'))
    .send({ engineId: engine, kind, assigneeId: t.userIds.technician, dueDate: '2026-12-10' })
    .expect(201);
  await request(t.app).post(`/api/work-orders/${res.body.id}/transition`).set(as('technician')).send({ to: 'in-progress' }).expect(200);
  return res.body;
}

describe('templates', () => {
  it('serves every kind; steps that open the system are gated and carry the hot-coolant caution', async () => {
    const res = await request(t.app).get('/api/work-order-templates').set(as('operator')).expect(200);
    expect(res.body.map((x: { kind: string }) => x.kind).sort()).toEqual([
      'coolant-test',
      'drain-flush-refill',
      'filter-change',
      'general-repair',
      'leak-check',
      'monthly-exercise',
      'oil-drain',
      'top-up',
      'weekly-inspection',
    ]);
    const filter = res.body.find((x: { kind: string }) => x.kind === 'filter-change');
    const gated = filter.steps.filter((s: { gated: boolean }) => s.gated).map((s: { key: string }) => s.key);
    expect(gated).toEqual(['relieve-pressure', 'remove-filter']);
    expect(filter.steps.find((s: { key: string }) => s.key === 'fit-filter')).toMatchObject({ input: 'value', unit: 'turns', gated: false });
    expect(filter.cautions.some((c: { text: string }) => c.text.includes('29 CFR 1910.147'))).toBe(true);
    const test = res.body.find((x: { kind: string }) => x.kind === 'coolant-test');
    expect(test.steps.find((s: { key: string }) => s.key === 'take-sample').title).toMatch(/never from the overflow reservoir/);
  });
  it('needs a signed-in user', async () => {
    await request(t.app).get('/api/work-order-templates').expect(401);
  });
});

describe('creation and transitions by role', () => {
  let id: number;
  it('an operator raises only a request; planning fields are refused', async () => {
    await request(t.app).post('/api/work-orders').set(as('operator')).send({ engineId, kind: 'leak-check', assigneeId: t.userIds.technician }).expect(403);
    const res = await request(t.app)
      .post('/api/work-orders')
      .set(as('operator'))
      .send({ engineId, kind: 'leak-check', description: 'Puddle under the pump' })
      .expect(201);
    expect(res.body).toMatchObject({ status: 'requested', requestedBy: t.userIds.operator, kind: 'leak-check' });
    expect(res.body.steps.length).toBeGreaterThan(2);
    for (const s of res.body.steps)
      expect(s).toEqual(expect.objectContaining({ id: expect.any(Number), title: expect.any(String), gated: expect.any(Boolean) }));
    id = res.body.id;
  });
  it('validation: unknown kind, unknown engine, bad date', async () => {
    expect((await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId, kind: 'paint-it' }).expect(400)).body.field).toBe('kind');
    expect((await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId: 9999, kind: 'top-up' }).expect(400)).body.field).toBe('engineId');
    expect(
      (await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId, kind: 'top-up', dueDate: '10/12/2026' }).expect(400)).body.field,
    ).toBe('dueDate');
    expect(
      (await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId, kind: 'top-up', assigneeId: t.userIds.operator }).expect(400)).body
        .field,
    ).toBe('assigneeId');
  });
  it('due dates: only whole, valid dates from the year 2000 are saved; half-typed years are refused naming the field', async () => {
    for (const dueDate of ['0002-12-05', '0020-12-05', '0202-12-05', '1999-12-31', '2026-02-30', '2026-13-01', '2026-12-5', '20261205', '2026-12-05T10:00']) {
      const res = await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId, kind: 'top-up', dueDate }).expect(400);
      expect({ dueDate, field: res.body.field }).toEqual({ dueDate, field: 'dueDate' });
    }
    const ok = await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId, kind: 'top-up', dueDate: '2026-12-05' }).expect(201);
    expect(ok.body.dueDate).toBe('2026-12-05');
    expect((await request(t.app).patch(`/api/work-orders/${ok.body.id}`).set(as('planner')).send({ dueDate: '0202-12-05' }).expect(400)).body.field).toBe(
      'dueDate',
    );
    const after = await request(t.app).get(`/api/work-orders/${ok.body.id}`).set(as('planner')).expect(200);
    expect(after.body.dueDate).toBe('2026-12-05');
    expect(after.body.history.filter((h: { event: string }) => h.event !== 'created').length).toBe(0);
  });
  it('only a planner or admin accepts; operator and technician are refused', async () => {
    await request(t.app).post(`/api/work-orders/${id}/transition`).set(as('operator')).send({ to: 'planned' }).expect(403);
    await request(t.app).post(`/api/work-orders/${id}/transition`).set(as('technician')).send({ to: 'planned' }).expect(403);
    await request(t.app).post(`/api/work-orders/${id}/transition`).set(as('planner')).send({ to: 'in-progress' }).expect(409);
    const res = await request(t.app).post(`/api/work-orders/${id}/transition`).set(as('planner')).send({ to: 'planned' }).expect(200);
    expect(res.body).toMatchObject({ status: 'planned', startedAt: null, completedAt: null, signedOffAt: null, closedAt: null });
  });
  it("assigning and scheduling are the planner's", async () => {
    await request(t.app).patch(`/api/work-orders/${id}`).set(as('technician')).send({ assigneeId: t.userIds.technician }).expect(403);
    const res = await request(t.app)
      .patch(`/api/work-orders/${id}`)
      .set(as('planner'))
      .send({ assigneeId: t.userIds.technician, dueDate: '2026-12-05', priority: 'high' })
      .expect(200);
    expect(res.body).toMatchObject({ assigneeId: t.userIds.technician, dueDate: '2026-12-05', priority: 'high', assigneeName: 'Test technician' });
  });
  it('the assigned technician starts; a planner or another technician cannot', async () => {
    await request(t.app).post(`/api/work-orders/${id}/transition`).set(as('planner')).send({ to: 'in-progress' }).expect(403);
    await request(t.app).post(`/api/work-orders/${id}/transition`).set(auth(otherTechToken)).send({ to: 'in-progress' }).expect(403);
    await request(t.app).post(`/api/work-orders/${id}/transition`).set(as('technician')).send({ to: 'in-progress' }).expect(200);
  });
  it('completion is refused while required steps are open', async () => {
    const res = await request(t.app).post(`/api/work-orders/${id}/transition`).set(as('technician')).send({ to: 'waiting-sign-off' }).expect(409);
    expect(res.body.error).toMatch(/required step/);
  });
  it('declining needs a note; every transition is in the history', async () => {
    const req = await request(t.app).post('/api/work-orders').set(as('operator')).send({ engineId, kind: 'top-up' }).expect(201);
    await request(t.app).post(`/api/work-orders/${req.body.id}/transition`).set(as('planner')).send({ to: 'cancelled' }).expect(400);
    const res = await request(t.app)
      .post(`/api/work-orders/${req.body.id}/transition`)
      .set(as('planner'))
      .send({ to: 'cancelled', note: 'Duplicate of an open order' })
      .expect(200);
    expect(res.body.history.map((h: { event: string }) => h.event)).toEqual(['requested', 'declined']);
    const d = await request(t.app).get(`/api/work-orders/${id}`).set(as('operator')).expect(200);
    expect(d.body.history.map((h: { event: string; toStatus: string | null }) => [h.event, h.toStatus])).toEqual([
      ['requested', 'requested'],
      ['accepted', 'planned'],
      ['assigned', null],
      ['started', 'in-progress'],
    ]);
  });
  it('lists filter by status, engine, site and mine', async () => {
    const all = await request(t.app).get('/api/work-orders?status=in-progress').set(as('planner')).expect(200);
    expect(all.body.every((o: { status: string }) => o.status === 'in-progress')).toBe(true);
    const mine = await request(t.app).get('/api/work-orders?mine=1').set(auth(otherTechToken)).expect(200);
    expect(mine.body).toEqual([]);
    expect((await request(t.app).get('/api/work-orders?mine=1').set(as('technician')).expect(200)).body.map((o: { id: number }) => o.id)).toContain(id);
    await request(t.app).get('/api/work-orders?status=lost').set(as('planner')).expect(400);
  });
});

describe('the opening check on gated steps (server re-computes it; the client is only its face)', () => {
  let order: Awaited<ReturnType<typeof plannedOrder>>;
  const step = (key: string) => order.steps.find((s) => s.key === key)!;
  beforeAll(async () => {
    order = await plannedOrder(engineId);
  });

  it('refuses without lockout/tagout confirmation, naming the unmet condition', async () => {
    const res = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${step('relieve-pressure').id}/complete`)
      .set(as('technician'))
      .send({})
      .expect(409);
    expect(res.body.conditions.map((c: { name: string }) => c.name)).toContain('lockout-confirmed');
  });

  it('refuses (409 with conditions) while the engine runs hot and pressurised, even with lockout ticked', async () => {
    await feed(history(engineId, { stopAtMin: 5, fromMin: -10 })); // running the whole time, 85 °C, 90 kPa
    const res = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${step('relieve-pressure').id}/complete`)
      .set(as('technician'))
      .send({ lockoutConfirmed: true })
      .expect(409);
    const names = res.body.conditions.map((c: { name: string }) => c.name);
    expect(names).toEqual(expect.arrayContaining(['engine-stopped', 'coolant-temperature', 'coolant-pressure', 'held']));
    expect(res.body.conditions.find((c: { name: string }) => c.name === 'coolant-temperature')).toMatchObject({ met: false, value: 85, limit: 50, unit: '°C' });
    expect(res.body.stale).toBe(false);
  });

  it('a manual check cannot overrule fresh live data that says hot', async () => {
    const res = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${step('relieve-pressure').id}/complete`)
      .set(as('technician'))
      .send({ lockoutConfirmed: true, manualCheck: { gaugeKpa: 0, tempC: 30, minutesSinceStop: 60, checkedBy: 'Test technician', reason: 'gauge reads zero' } })
      .expect(409);
    expect(res.body.error).toMatch(/fresh|not safe/);
    expect(await t.ctx.models.AuditEntry.count({ where: { action: 'opening-check-manual-override' } })).toBe(0);
  });

  it('the opening-check route answers with the same conditions', async () => {
    const res = await request(t.app).get(`/api/engines/${engineId}/opening-check`).set(as('operator')).expect(200);
    expect(res.body.clear).toBe(false);
    expect(res.body.conditions.find((c: { name: string }) => c.name === 'engine-stopped').met).toBe(false);
    await request(t.app).get(`/api/engines/${engineId}/opening-check`).expect(401);
    await request(t.app).get('/api/engines/9999/opening-check').set(as('operator')).expect(404);
  });

  it('still shut while cooling: stopped 12 min ago, coolant above 50 °C; predicts a clear time', async () => {
    // cold engine: ran until 12 min ago, tau 900 s: 25 + 60 e^(-720/900) = 52.0 °C now
    await feed(history(coldEngineId, { stopAtMin: -12, fromMin: -30 }));
    const res = await request(t.app).get(`/api/engines/${coldEngineId}/opening-check?lockoutConfirmed=true`).set(as('technician')).expect(200);
    const temp = res.body.conditions.find((c: { name: string }) => c.name === 'coolant-temperature');
    expect(temp.met).toBe(false);
    expect(temp.value).toBeCloseTo(25 + 60 * Math.exp(-720 / 900), 0);
    // Newton: 50 °C reached at 900 ln(60/25) = 788 s after the stop, then held 120 s
    const expected = Date.now() - 12 * MIN + (900 * Math.log(60 / 25) + 120) * 1000;
    expect(Math.abs(res.body.clearAt - expected)).toBeLessThan(60_000);
  });

  it('accepts once readings show stopped, cool, depressurised and held', async () => {
    const e = await t.ctx.models.Engine.create({
      siteId: (await t.ctx.models.Site.findOne())!.id,
      name: 'Cooled engine',
      duty: 'standby',
      capacityL: 60,
      coolantFamily: 'conventional',
      glycolType: 'ethylene',
      glycolPercent: 50,
      capPressureKpa: 100,
      oilDrainIntervalH: 250,
    });
    const cold = await plannedOrder(e.id);
    const s = cold.steps.find((x) => x.key === 'relieve-pressure')!;
    // before any reading arrives: shut (no data)
    await request(t.app).post(`/api/work-orders/${cold.id}/steps/${s.id}/complete`).set(as('technician')).send({ lockoutConfirmed: true }).expect(409);
    // ran until 40 min ago, then cooled: 25 + 60 e^(-2400/900) = 29.2 °C, pressure long at zero gauge
    await feed(history(e.id, { stopAtMin: -40, fromMin: -60 }));
    const check = await request(t.app).get(`/api/engines/${e.id}/opening-check?lockoutConfirmed=true`).set(as('technician')).expect(200);
    expect(check.body.clear).toBe(true);
    expect(check.body.conditions.find((c: { name: string }) => c.name === 'coolant-temperature').value).toBeCloseTo(25 + 60 * Math.exp(-2400 / 900), 1);
    const res = await request(t.app)
      .post(`/api/work-orders/${cold.id}/steps/${s.id}/complete`)
      .set(as('technician'))
      .send({ lockoutConfirmed: true })
      .expect(200);
    const done = res.body.steps.find((x: { id: number }) => x.id === s.id);
    expect(done).toMatchObject({ lockoutConfirmed: true, manualCheck: null, doneByName: 'Test technician' });
    expect(done.gateSnapshot).toMatchObject({ clear: true, manual: false });
  });
});

describe('the stop comes from the stored record', () => {
  it('stopped two days ago with only the last 4 minutes of readings since: met; a new run resets it', async () => {
    const e = await t.ctx.models.Engine.create({
      siteId: (await t.ctx.models.Site.findOne())!.id,
      name: 'Long-stopped engine',
      duty: 'standby',
      capacityL: 60,
      coolantFamily: 'conventional',
      glycolType: 'ethylene',
      glycolPercent: 50,
      capPressureKpa: 100,
      oilDrainIntervalH: 250,
    });
    const now = Date.now();
    const stop = now - 2 * 24 * 60 * MIN;
    const rows: AcceptedReading[] = [
      { engineId: e.id, channel: 'engine_speed', ts: stop - 10_000, value: 1800, quality: 0 },
      { engineId: e.id, channel: 'engine_speed', ts: stop, value: 0, quality: 0 },
    ];
    for (let ts = now - 4 * MIN; ts <= now; ts += 10_000) {
      for (const [channel, value] of [
        ['engine_speed', 0],
        ['coolant_temp', 21],
        ['coolant_pressure', 0],
        ['ambient_temp', 20],
      ] as const)
        rows.push({ engineId: e.id, channel, ts, value, quality: 0 });
    }
    await feed(rows);
    const res = await request(t.app).get(`/api/engines/${e.id}/opening-check`).set(as('technician')).expect(200);
    const c = res.body.conditions.find((x: { name: string }) => x.name.includes('stop'));
    expect(c.met).toBe(true);
    expect(Math.abs(c.value - (Date.now() - stop) / 1000)).toBeLessThan(60);
    // the engine runs again (an exercise): the record follows the live readings
    await feed([{ engineId: e.id, channel: 'engine_speed', ts: Date.now(), value: 1500, quality: 0 }]);
    await feed([{ engineId: e.id, channel: 'engine_speed', ts: Date.now() + 1, value: 0, quality: 0 }]);
    const after = await request(t.app).get(`/api/engines/${e.id}/opening-check`).set(as('technician')).expect(200);
    const c2 = after.body.conditions.find((x: { name: string }) => x.name.includes('stop'));
    expect(c2.met).toBe(false);
    expect(c2.value).toBeLessThan(60);
  });
});

describe('manual check when live data is stale or missing', () => {
  let order: Awaited<ReturnType<typeof plannedOrder>>;
  beforeAll(async () => {
    order = await plannedOrder(staleEngineId, 'top-up');
  });
  const gatedStep = () => order.steps.find((s) => s.gated)!;

  it('without a manual check: 409, stale', async () => {
    const res = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${gatedStep().id}/complete`)
      .set(as('technician'))
      .send({ lockoutConfirmed: true })
      .expect(409);
    expect(res.body.stale).toBe(true);
    expect(res.body.conditions.map((c: { name: string }) => c.name)).toContain('telemetry-fresh');
  });

  it('hand readings that are themselves unsafe are refused', async () => {
    const res = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${gatedStep().id}/complete`)
      .set(as('technician'))
      .send({
        lockoutConfirmed: true,
        manualCheck: { gaugeKpa: 40, tempC: 70, minutesSinceStop: 5, checkedBy: 'Test technician', reason: 'gateway offline since the storm' },
      })
      .expect(409);
    expect(res.body.conditions.map((c: { name: string }) => c.name).sort()).toEqual(['manual-pressure', 'manual-stopped', 'manual-temperature']);
  });

  it('accepted, recorded on the step, audited, and the planner is told by e-mail', async () => {
    const res = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${gatedStep().id}/complete`)
      .set(as('technician'))
      .send({
        lockoutConfirmed: true,
        manualCheck: { gaugeKpa: 0, tempC: 31, minutesSinceStop: 240, checkedBy: 'Test technician', reason: 'gateway offline since the storm' },
      })
      .expect(200);
    const s = res.body.steps.find((x: { id: number }) => x.id === gatedStep().id);
    expect(s.manualCheck).toMatchObject({ gaugeKpa: 0, tempC: 31, minutesSinceStop: 240 });
    expect(s.gateSnapshot).toMatchObject({ manual: true, clear: false, stale: true });
    expect(res.body.manualChecks).toBe(1);
    expect(res.body.history.some((h: { event: string }) => h.event === 'step-done-manual-check')).toBe(true);
    const audit = await t.ctx.models.AuditEntry.findAll({ where: { entityId: s.id } });
    expect(audit.map((a) => a.action).sort()).toEqual(['opening-check-manual-override', 'planners-told']);
    const mail = await t.ctx.models.OutboxMessage.findAll();
    expect(mail.some((m) => m.to.includes('planner@example.test') && /Manual opening check/.test(m.subject) && /31 °C/.test(m.text))).toBe(true);
    // pushed after the engine's site is looked up (to the rooms of that site only)
    const pushed = await until(
      'work-order-notice pushed',
      async () => emitted.find((e) => e.event === 'work-order-notice'),
      (e) => e !== undefined,
    );
    expect(pushed!.room).toEqual(expect.arrayContaining(['fleet', `site:${siteId}`]));
  });
});

describe('attachments', () => {
  let order: Awaited<ReturnType<typeof plannedOrder>>;
  const JPEG = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10]), Buffer.from('JFIF\0'), Buffer.alloc(200, 1), Buffer.from([0xff, 0xd9])]);
  beforeAll(async () => {
    order = await plannedOrder(engineId);
  });
  const upload = (token: string | null, buf: Buffer, name: string, stepId?: number) => {
    let r = request(t.app).post(`/api/work-orders/${order.id}/attachments`);
    if (token) r = r.set(auth(token));
    if (stepId) r = r.field('stepId', String(stepId));
    return r.attach('file', buf, { filename: name, contentType: 'image/jpeg' });
  };

  it('too large: 413', async () => {
    const big = Buffer.concat([JPEG, Buffer.alloc(8 * 1024 * 1024 + 10)]);
    const res = await upload(t.tokens.technician, big, 'big.jpg').expect(413);
    expect(res.body.field).toBe('file');
  });

  it('wrong content behind a .jpg name and an image/jpeg type: 415', async () => {
    const res = await upload(t.tokens.technician, Buffer.from('<html><script>alert(1)</script></html>'), 'photo.jpg').expect(415);
    expect(res.body.error).toMatch(/checked by content/);
  });

  it('a path-traversal file name is kept only as a label; the file gets a generated name inside uploads', async () => {
    const res = await upload(t.tokens.technician, JPEG, '../../../../etc/evil.jpg').expect(201);
    expect(res.body.originalName).toBe('evil.jpg');
    const row = await t.ctx.models.Attachment.findByPk(res.body.id);
    expect(row!.storedName).toMatch(/^[0-9a-f-]{36}\.jpg$/);
    expect(fs.existsSync(path.join(t.dataDir, 'uploads', row!.storedName))).toBe(true);
    expect(fs.existsSync(path.join(t.dataDir, '..', 'etc', 'evil.jpg'))).toBe(false);
  });

  it('a non-ASCII file name keeps its UTF-8 characters; a text-direction override is not kept', async () => {
    const res = await upload(t.tokens.technician, Buffer.from('%PDF-1.4\n%...'), 'Prüfbericht Kühlmittel.pdf').expect(201);
    expect(res.body.originalName).toBe('Prüfbericht Kühlmittel.pdf');
    const tricky = await upload(t.tokens.technician, JPEG, 'photo\u202Egpj.exe.jpg').expect(201);
    expect(tricky.body.originalName).not.toMatch(/\u202E/);
  });

  it('served only to signed-in users, with the type found by content', async () => {
    const up = await upload(t.tokens.technician, JPEG, 'pump.jpg').expect(201);
    await request(t.app).get(`/api/attachments/${up.body.id}`).expect(401);
    const res = await request(t.app)
      .get(`/api/attachments/${up.body.id}`)
      .set(as('operator'))
      .buffer(true)
      .parse((r, cb) => {
        const c: Buffer[] = [];
        r.on('data', (d: Buffer) => c.push(d));
        r.on('end', () => cb(null, Buffer.concat(c)));
      })
      .expect(200);
    expect(res.headers['content-type']).toBe('image/jpeg');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(Buffer.compare(res.body as Buffer, JPEG)).toBe(0);
  });

  it('unauthenticated upload: 401; operator upload: 403; PNG and PDF accepted', async () => {
    await upload(null, JPEG, 'x.jpg').expect(401);
    await upload(t.tokens.operator, JPEG, 'x.jpg').expect(403);
    const png = Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.alloc(40)]);
    expect((await upload(t.tokens.technician, png, 'x.jpg').expect(201)).body.contentType).toBe('image/png');
    expect((await upload(t.tokens.technician, Buffer.from('%PDF-1.4\n%...'), 'lab.pdf').expect(201)).body.contentType).toBe('application/pdf');
  });
});

describe('a filter change from start to sign-off', () => {
  let order: Awaited<ReturnType<typeof plannedOrder>>;
  let engine: number;
  beforeAll(async () => {
    const e = await t.ctx.models.Engine.create({
      siteId: (await t.ctx.models.Site.findOne())!.id,
      name: 'Service engine',
      duty: 'standby',
      capacityL: 60,
      coolantFamily: 'conventional',
      glycolType: 'ethylene',
      glycolPercent: 50,
      capPressureKpa: 100,
      oilDrainIntervalH: 250,
      runHours: 2000,
    });
    engine = e.id;
    await feed(history(engine, { stopAtMin: -45, fromMin: -70, cond: 2400 }));
    order = await plannedOrder(engine);
  });

  it('every required step, parts, completion, resets and sign-off; then the record is frozen', async () => {
    const base = `/api/work-orders/${order.id}`;
    for (const s of order.steps.filter((x) => !x.optional)) {
      const body: Record<string, unknown> = { lockoutConfirmed: s.gated ? true : undefined };
      if (s.input === 'value') Object.assign(body, s.unit === 'turns' ? { value: 0.75, unit: 'turns' } : { value: 12, unit: 'L' });
      if (s.key === 'refill') {
        // wrong unit, out of range, then in US gallons (converted to litres, NIST SP 811: 1 gal = 3.785411784 L)
        await request(t.app).post(`${base}/steps/${s.id}/complete`).set(as('technician')).send({ value: 3, unit: 'kPa' }).expect(400);
        Object.assign(body, { value: 3, unit: 'gal' });
      }
      if (s.key === 'leak-run') await feed(history(engine, { stopAtMin: 10, fromMin: -1, cond: 1900 })); // fresh coolant runs: new conductivity
      const res = await request(t.app).post(`${base}/steps/${s.id}/complete`).set(as('technician')).send(body);
      expect({ key: s.key, status: res.status }).toEqual({ key: s.key, status: 200 });
      if (s.key === 'refill') expect(res.body.steps.find((x: { id: number }) => x.id === s.id).resultValue).toBeCloseTo(3 * 3.785411784, 9);
    }
    await request(t.app).post(`${base}/parts`).set(as('technician')).send({ kind: 'filter-blank', quantity: 1, unit: 'pcs' }).expect(201);
    await request(t.app).post(`${base}/parts`).set(as('technician')).send({ kind: 'coolant', quantity: 11.4, unit: 'pcs' }).expect(400);
    await request(t.app)
      .post(`${base}/parts`)
      .set(as('technician'))
      .send({ kind: 'coolant', quantity: 11.4, unit: 'L', description: '50/50 premix' })
      .expect(201);
    await request(t.app).post(`${base}/transition`).set(auth(otherTechToken)).send({ to: 'waiting-sign-off' }).expect(403);
    const done = await request(t.app).post(`${base}/transition`).set(as('technician')).send({ to: 'waiting-sign-off' }).expect(200);
    expect(done.body.status).toBe('waiting-sign-off');

    const ev = await t.ctx.models.ServiceEvent.findAll({ where: { engineId: engine } });
    expect(ev.map((e) => [e.taskKey, e.runHours, e.workOrderId])).toEqual([['filter-change', 2000, order.id]]);
    const baselines = await t.ctx.models.EngineBaseline.findAll({ where: { engineId: engine } });
    expect(baselines).toHaveLength(1);
    expect(baselines[0].value).toBe(1900);

    await request(t.app).post(`${base}/transition`).set(as('technician')).send({ to: 'closed' }).expect(403);
    const closed = await request(t.app).post(`${base}/transition`).set(as('planner')).send({ to: 'closed', note: 'Checked the record' }).expect(200);
    expect(closed.body).toMatchObject({ status: 'closed', signedOffByName: 'Test planner' });
    for (const k of ['startedAt', 'completedAt', 'signedOffAt', 'closedAt']) expect(typeof closed.body[k]).toBe('string');
    expect(Date.parse(closed.body.signedOffAt)).toBeGreaterThanOrEqual(Date.parse(closed.body.completedAt));
    expect(Date.parse(closed.body.completedAt)).toBeGreaterThan(Date.parse(closed.body.startedAt));
    expect(await t.ctx.models.AuditEntry.count({ where: { action: 'work-order-signed-off', entityId: order.id } })).toBe(1);

    // frozen: no edits, no parts, no steps, no files, no further transitions; amendments are appended
    await request(t.app).patch(base).set(as('planner')).send({ title: 'Rewritten' }).expect(409);
    await request(t.app).post(`${base}/parts`).set(as('technician')).send({ kind: 'additive', quantity: 1, unit: 'L' }).expect(409);
    await request(t.app).post(`${base}/transition`).set(as('planner')).send({ to: 'in-progress', note: 'again' }).expect(409);
    const opt = order.steps.find((x) => x.optional)!;
    await request(t.app).post(`${base}/steps/${opt.id}/complete`).set(as('technician')).send({}).expect(409);
    await request(t.app).post(`${base}/amendments`).set(as('operator')).send({ text: 'x' }).expect(403);
    const am = await request(t.app)
      .post(`${base}/amendments`)
      .set(as('planner'))
      .send({ text: 'Filter part number was wrong on the record: it was the blank one.' })
      .expect(201);
    expect(am.body.amendments).toHaveLength(1);
    expect(am.body.title).not.toBe('Rewritten');
    const events = am.body.history.map((h: { event: string }) => h.event);
    expect(events.filter((e: string) => ['created', 'started', 'completed', 'signed-off', 'amended'].includes(e))).toEqual([
      'created',
      'started',
      'completed',
      'signed-off',
      'amended',
    ]);
    expect(events).toContain('baseline-reset');
  });
});

describe('from an alarm in one click', () => {
  it('links the alarm and carries its data into the description and priority', async () => {
    const alarm = await t.ctx.models.Alarm.create({
      engineId,
      rule: 'coolant_temp_high',
      priority: 'high',
      state: 'unacknowledged',
      raisedAt: new Date('2026-12-01T10:00:00Z'),
      value: 104.2,
      worstValue: 106,
      unit: 'degC',
      message: 'Coolant temperature high',
    });
    const res = await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId, kind: 'leak-check', alarmId: alarm.id }).expect(201);
    expect(res.body).toMatchObject({ status: 'planned', priority: 'high', alarmIds: [alarm.id] });
    // in words: the rule's title, the priority, the time in the site's zone (UTC here), values with units (°F = 1.8 °C + 32)
    expect(res.body.description).toBe(
      `From alarm #${alarm.id}: Coolant temperature high, high priority, raised 1 Dec 2026, 10:00 (UTC). Coolant temperature high. Value when raised: 104.2 °C (219.6 °F). Worst since: 106.0 °C (222.8 °F).`,
    );
    expect(res.body.description).not.toMatch(/coolant_temp_high|T10:00/);
    await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId: coldEngineId, kind: 'leak-check', alarmId: alarm.id }).expect(400);
  });
});

describe('drafts that stay, locked steps and the single coolant test', () => {
  type Step = {
    id: number;
    key: string;
    resultValue: number | null;
    resultUnit: string | null;
    resultText: string | null;
    doneAt: string | null;
    lockoutConfirmed: boolean | null;
  };
  let order: { id: number; steps: Step[] };
  let cooledId: number;
  const step = (key: string) => order.steps.find((s) => s.key === key)!;
  const patch = (key: string, body: object) =>
    request(t.app)
      .patch(`/api/work-orders/${order.id}/steps/${step(key).id}`)
      .set(as('technician'))
      .send(body);
  beforeAll(async () => {
    cooledId = (
      await t.ctx.models.Engine.create({
        siteId: (await t.ctx.models.Site.findOne())!.id,
        name: 'Sampled engine',
        duty: 'standby',
        capacityL: 60,
        coolantFamily: 'conventional',
        glycolType: 'ethylene',
        glycolPercent: 50,
        capPressureKpa: 100,
        oilDrainIntervalH: 250,
      })
    ).id;
    order = (await plannedOrder(cooledId, 'coolant-test')) as unknown as typeof order;
  });

  it('a draft is saved without completing the step and comes back on GET', async () => {
    await patch('freeze-point', { value: -29.2, unit: 'degF', note: 'refractometer' }).expect(200);
    await patch('sca-level', { value: 0.8 }).expect(200);
    await patch('glycol-percent', { value: 48 }).expect(200);
    await patch('nitrite', { value: 650 }).expect(200);
    const res = await request(t.app).get(`/api/work-orders/${order.id}`).set(as('technician')).expect(200);
    const fp = res.body.steps.find((s: Step) => s.key === 'freeze-point');
    expect(fp).toMatchObject({ resultValue: -29.2, resultUnit: 'degF', resultText: 'refractometer', doneAt: null });
    expect(res.body.steps.find((s: Step) => s.key === 'sca-level')).toMatchObject({ resultValue: 0.8, resultUnit: 'units/gal', doneAt: null });
    expect(res.body.stepsDone).toBe(0);
  });

  it('bad drafts: a unit the step does not take, a value on a confirmation step, another technician, a planner', async () => {
    expect((await patch('freeze-point', { value: 3, unit: 'psi' }).expect(400)).body.field).toBe('unit');
    expect((await patch('method', { value: 3 }).expect(400)).body.field).toBe('value');
    expect((await patch('freeze-point', { value: 'cold' }).expect(400)).body.field).toBe('value');
    await request(t.app)
      .patch(`/api/work-orders/${order.id}/steps/${step('ph').id}`)
      .set(auth(otherTechToken))
      .send({ value: 9 })
      .expect(403);
    await request(t.app)
      .patch(`/api/work-orders/${order.id}/steps/${step('ph').id}`)
      .set(as('planner'))
      .send({ value: 9 })
      .expect(403);
  });

  it('a locked gated step accepts no results (409 with the unmet conditions)', async () => {
    const res = await patch('take-sample', { note: 'from the block drain' }).expect(409);
    expect(res.body.conditions.map((c: { name: string }) => c.name)).toContain('lockout-confirmed');
    const after = await request(t.app).get(`/api/work-orders/${order.id}`).set(as('technician')).expect(200);
    expect(after.body.steps.find((s: Step) => s.key === 'take-sample').resultText).toBeNull();
  });

  it('the test cannot be recorded before the sample is taken', async () => {
    const res = await request(t.app).post(`/api/work-orders/${order.id}/coolant-test`).set(as('technician')).send({}).expect(409);
    expect(res.body.error).toMatch(/sample/);
  });

  it('lockout/tagout confirmed on the lock-out step is carried to the gated sampling step', async () => {
    const lock = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${step('stop-and-lock-out').id}/complete`)
      .set(as('technician'))
      .send({})
      .expect(200);
    expect(lock.body.steps.find((s: Step) => s.key === 'stop-and-lock-out').lockoutConfirmed).toBe(true);
    // still shut while no readings say the system is safe, even with lockout carried
    const shut = await patch('take-sample', { note: 'x' }).expect(409);
    expect(shut.body.conditions.map((c: { name: string }) => c.name)).not.toContain('lockout-confirmed');
    // ran until 40 min ago, then cooled (Newton, tau 900 s): 29.2 °C, no pressure
    await feed(history(cooledId, { stopAtMin: -40, fromMin: -60 }));
    await patch('take-sample', { note: 'from the block drain' }).expect(200);
    const done = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${step('take-sample').id}/complete`)
      .set(as('technician'))
      .send({})
      .expect(200);
    const s = done.body.steps.find((x: Step) => x.key === 'take-sample');
    expect(s).toMatchObject({ lockoutConfirmed: true, resultText: 'from the block drain' });
    expect(s.doneAt).not.toBeNull();
  });

  it('completing keeps the drafted values (converted to the step unit) and the remark', async () => {
    const res = await request(t.app)
      .post(`/api/work-orders/${order.id}/steps/${step('freeze-point').id}/complete`)
      .set(as('technician'))
      .send({})
      .expect(200);
    const fp = res.body.steps.find((s: Step) => s.key === 'freeze-point');
    // (-29.2 °F - 32) x 5/9 = -34.0 °C (definition of the Fahrenheit scale, NIST SP 811 B.8)
    expect(fp.resultValue).toBeCloseTo(-34, 6);
    expect(fp).toMatchObject({ resultUnit: 'degC', resultText: 'refractometer' });
    await patch('freeze-point', { value: 1 }).expect(409);
  });

  it('records the coolant test once; a second attempt answers 409 with the recorded test', async () => {
    const first = await request(t.app).post(`/api/work-orders/${order.id}/coolant-test`).set(as('technician')).send({ method: 'refractometer' }).expect(201);
    expect(first.body.coolantTest).toMatchObject({ engineId: cooledId, scaUnitsPerGal: 0.8, glycolPercent: 48, method: 'refractometer' });
    expect(first.body.coolantTest.freezePointC).toBeCloseTo(-34, 6);
    // nitrite from its step, judged against the 800 ppm low limit (common practice, from memory; admin setting)
    expect(first.body.coolantTest.nitritePpm).toBe(650);
    expect(first.body.coolantTest.decision.findings.find((f: { field: string }) => f.field === 'nitritePpm')).toMatchObject({ status: 'low' });
    expect(first.body.order.coolantTestId).toBe(first.body.coolantTest.id);
    const again = await request(t.app).post(`/api/work-orders/${order.id}/coolant-test`).set(as('technician')).send({}).expect(409);
    expect(again.body.coolantTest.id).toBe(first.body.coolantTest.id);
    const both = await Promise.all([1, 2].map(() => request(t.app).post(`/api/work-orders/${order.id}/coolant-test`).set(as('planner')).send({})));
    expect(both.map((r) => r.status)).toEqual([409, 409]);
    expect(await t.ctx.models.CoolantTest.count({ where: { engineId: cooledId } })).toBe(1);
    const detail = await request(t.app).get(`/api/work-orders/${order.id}`).set(as('operator')).expect(200);
    expect(detail.body.coolantTest.id).toBe(first.body.coolantTest.id);
    expect(detail.body.history.some((h: { event: string }) => h.event === 'coolant-test-recorded')).toBe(true);
  });
});

describe('OpenAPI', () => {
  it('documents every work-order route', async () => {
    const doc = (await request(t.app).get('/api/openapi.json').expect(200)).body as { paths: Record<string, Record<string, unknown>> };
    const routes: Array<[string, string]> = [
      ['/api/work-order-templates', 'get'],
      ['/api/engines/{id}/opening-check', 'get'],
      ['/api/work-orders', 'get'],
      ['/api/work-orders', 'post'],
      ['/api/work-orders/{id}', 'get'],
      ['/api/work-orders/{id}', 'patch'],
      ['/api/work-orders/{id}/transition', 'post'],
      ['/api/work-orders/{id}/steps/{stepId}/complete', 'post'],
      ['/api/work-orders/{id}/parts', 'post'],
      ['/api/work-orders/{id}/amendments', 'post'],
      ['/api/work-orders/{id}/attachments', 'post'],
      ['/api/work-orders/{id}/steps/{stepId}', 'patch'],
      ['/api/work-orders/{id}/coolant-test', 'post'],
      ['/api/attachments/{id}', 'get'],
      ['/api/work-orders/assignees', 'get'],
    ];
    for (const [p, m] of routes) expect({ p, m, documented: !!doc.paths[p]?.[m] }).toEqual({ p, m, documented: true });
  });
});
