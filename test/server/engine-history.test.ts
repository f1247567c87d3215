/**
 * An engine's service history over HTTP against a real SQLite file: a coolant test work order done on a
 * manual opening check (the engine sends no live data) and signed off, a second order still open,
 * a coolant test, a run-hours correction, and what the completion reset; newest first; another
 * site's engine reads as not found.
 *
 * The hand readings used for the manual check (0 kPa gauge, 31 °C, 4 h stopped) are inside the opening
 * limits of shared/work/opening-check.ts (about 50 °C and zero gauge pressure: common guidance of the
 * trade, /work/shared/reference/coolant-references.md "Cooling down"). The additive decision of the
 * recorded test is decideAdditive's own (tested in test/shared against its sources); here we only check
 * that the history carries it unchanged.
 */
import request from 'supertest';
import { auth, makeTestApp, PASSWORD, type TestApp } from './helpers';

let t: TestApp;
let engineId: number;
let otherSiteEngineId: number;
let limitedToken: string;
let closedOrderId: number;
let openOrderId: number;

const as = (role: 'admin' | 'planner' | 'technician' | 'operator') => auth(t.tokens[role]);
const manualCheck = { gaugeKpa: 0, tempC: 31, minutesSinceStop: 240, checkedBy: 'Test technician', reason: 'gateway offline after the storm' };

beforeAll(async () => {
  t = await makeTestApp();
  const { Site, Engine, UserSite } = t.ctx.models;
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
    runHours: 1500,
  });
  const siteA = (await Site.create({ name: 'Pump house', timeZone: 'UTC' })).id;
  const siteB = (await Site.create({ name: 'Far site', timeZone: 'UTC' })).id;
  engineId = (await Engine.create(row(siteA, 'Fire pump engine'))).id;
  otherSiteEngineId = (await Engine.create(row(siteB, 'Far engine'))).id;

  // a planner who sees only the far site
  const { createUser } = await import('../../server/services/users');
  const limited = await createUser(t.ctx.models, { email: 'far@example.test', name: 'Far planner', password: PASSWORD, role: 'planner' }, 4);
  await UserSite.create({ userId: limited.id, siteId: siteB });
  limitedToken = (await request(t.app).post('/api/auth/login').send({ email: 'far@example.test', password: PASSWORD }).expect(200)).body.token;

  // 1: a coolant-test work order, done on a manual check, with parts, completed and signed off
  const created = await request(t.app)
    .post('/api/work-orders')
    .set(as('planner'))
    .send({ engineId, kind: 'coolant-test', assigneeId: t.userIds.technician })
    .expect(201);
  closedOrderId = created.body.id;
  const base = `/api/work-orders/${closedOrderId}`;
  await request(t.app).post(`${base}/transition`).set(as('technician')).send({ to: 'in-progress' }).expect(200);
  for (const s of created.body.steps.filter((x: { optional: boolean }) => !x.optional)) {
    const body: Record<string, unknown> = {};
    if (s.gated) Object.assign(body, { lockoutConfirmed: true, manualCheck });
    if (s.input === 'value') Object.assign(body, { value: -37, unit: 'degC' });
    const res = await request(t.app).post(`${base}/steps/${s.id}/complete`).set(as('technician')).send(body);
    expect({ key: s.key, status: res.status }).toEqual({ key: s.key, status: 200 });
  }
  await request(t.app).post(`${base}/parts`).set(as('technician')).send({ kind: 'additive', quantity: 0.5, unit: 'L', description: 'liquid SCA' }).expect(201);
  await request(t.app).post(`${base}/transition`).set(as('technician')).send({ to: 'waiting-sign-off' }).expect(200);
  await request(t.app).post(`${base}/transition`).set(as('planner')).send({ to: 'closed', note: 'record checked' }).expect(200);

  // 2: a coolant test, a run-hours correction, then a second order left open (the newest)
  await request(t.app)
    .post(`/api/engines/${engineId}/coolant-tests`)
    .set(as('technician'))
    .send({ method: 'strip', scaUnitsPerGal: 0.8, glycolPercent: 50 })
    .expect(201);
  await request(t.app).post(`/api/engines/${engineId}/run-hours`).set(as('planner')).send({ runHours: 1512.5, reason: 'read from the hour meter' }).expect(200);
  openOrderId = (await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId, kind: 'leak-check' }).expect(201)).body.id;
  await request(t.app).post('/api/work-orders').set(as('planner')).send({ engineId: otherSiteEngineId, kind: 'top-up' }).expect(201);
});
afterAll(() => t.close());

describe('GET /api/engines/:id/history', () => {
  it('lists work orders newest first, with who did it, who signed off, parts and the manual-check override', async () => {
    const res = await request(t.app).get(`/api/engines/${engineId}/history`).set(as('operator')).expect(200);
    const h = res.body;
    expect(h.engine).toMatchObject({ id: engineId, name: 'Fire pump engine', siteName: 'Pump house', capacityL: 60, runHours: 1512.5 });
    expect(Date.parse(h.generatedAt)).not.toBeNaN();
    expect(h.workOrders.map((o: { id: number }) => o.id)).toEqual([openOrderId, closedOrderId]); // the other site's order is not here
    const [open, closed] = h.workOrders;
    expect(open).toMatchObject({ status: 'planned', kind: 'leak-check', closedAt: null, signedOffByName: null, parts: [], manualCheckSteps: [] });
    expect(closed).toMatchObject({
      status: 'closed',
      kind: 'coolant-test',
      assigneeName: 'Test technician',
      signedOffByName: 'Test planner',
      doneByNames: ['Test technician'],
      manualChecks: 1,
    });
    expect(closed.at).toBe(closed.closedAt);
    expect(closed.parts).toEqual([{ kind: 'additive', description: 'liquid SCA', quantity: 0.5, unit: 'L' }]);
    expect(closed.manualCheckSteps).toHaveLength(1);
    expect(closed.manualCheckSteps[0]).toMatchObject({ ...manualCheck, doneByName: 'Test technician' });
    expect(closed.manualCheckSteps[0].stepTitle).toMatch(/sample/i);
  });

  it('carries coolant tests with their stored decision, run-hours corrections and service events', async () => {
    const h = (await request(t.app).get(`/api/engines/${engineId}/history`).set(as('technician')).expect(200)).body;
    const direct = (await request(t.app).get(`/api/engines/${engineId}/coolant-tests`).set(as('technician')).expect(200)).body;
    expect(h.coolantTests).toEqual(direct);
    expect(h.coolantTests[0]).toMatchObject({ method: 'strip', scaUnitsPerGal: 0.8, decision: { additive: { status: 'low', filter: 'charged' } } });
    expect(h.runHoursAdjustments).toEqual([
      expect.objectContaining({ oldRunHours: 1500, newRunHours: 1512.5, reason: 'read from the hour meter', userName: 'Test planner' }),
    ]);
    // completing the coolant-test order reset the plan's coolant-test task, at the run hours of that moment
    expect(h.serviceEvents).toEqual([expect.objectContaining({ taskKey: 'coolant-test', runHours: 1500, workOrderId: closedOrderId })]);
    expect(h.serviceEvents[0].taskTitle).toMatch(/^Coolant test/);
  });

  it("another site's engine is not found (404), unknown ids too; no token is 401; a bad id is 400", async () => {
    const hidden = await request(t.app).get(`/api/engines/${engineId}/history`).set(auth(limitedToken)).expect(404);
    expect(hidden.body.error).toMatch(/not found/);
    await request(t.app).get(`/api/engines/${otherSiteEngineId}/history`).set(auth(limitedToken)).expect(200);
    await request(t.app).get('/api/engines/99999/history').set(as('admin')).expect(404);
    await request(t.app).get(`/api/engines/${engineId}/history`).expect(401);
    await request(t.app).get('/api/engines/abc/history').set(as('admin')).expect(400);
  });

  it('is in the OpenAPI document', async () => {
    const doc = (await request(t.app).get('/api/openapi.json').expect(200)).body;
    expect(doc.paths['/api/engines/{id}/history'].get.tags).toEqual(['service history']);
  });
});
