/**
 * The fleet list's freeze-protection flag and the top-up step of a work order, over HTTP on a real database.
 *
 * Freeze points: Lange's Handbook of Chemistry, 15th ed. (1999), table 5.13 (propylene glycol by volume:
 * 30 % -> -12.8 °C, 40 % -> -20.6 °C, 50 % -> -33.3 °C). Freeze margin 5 K below the site's design low: common practice
 * (admin setting). Top-up estimate: mass balance of mixing, C1V1 + C2V2 = C3V3 (any general chemistry text), by hand.
 * US gallon = 3.785411784 L exactly (NIST SP 811, appendix B). Additive low limit 1.2 units/US gal: common practice.
 */
import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let siteId: number;
let pgEngine: number;
let quietEngine: number;
let topUpEngine: number;
beforeAll(async () => {
  t = await makeTestApp();
  const { Site, Engine } = t.ctx.models;
  siteId = (await Site.create({ name: 'Upland pumping', timeZone: 'America/Denver' })).id;
  const row = (name: string, extra: object = {}) => ({
    siteId,
    name,
    duty: 'standby' as const,
    capacityL: 40,
    coolantFamily: 'conventional' as const,
    glycolType: 'propylene' as const,
    glycolPercent: 40,
    capPressureKpa: 100,
    oilDrainIntervalH: 250,
    runHours: 100,
    ...extra,
  });
  pgEngine = (await Engine.create(row('Fire pump PG'))).id;
  quietEngine = (await Engine.create(row('No tests yet'))).id;
  topUpEngine = (await Engine.create(row('Top-up engine', { glycolType: 'ethylene', glycolPercent: 50 }))).id;
});
afterAll(() => t.close());

const as = (role: keyof TestApp['tokens']) => auth(t.tokens[role]);
type Freeze = {
  status: string;
  freezePointC: number | null;
  requiredC: number | null;
  designLowC: number | null;
  marginK: number;
  message: string;
  action: string;
};
async function freezeOf(id: number): Promise<Freeze | undefined> {
  const list = await request(t.app).get('/api/engines').set(as('operator')).expect(200);
  return list.body.find((e: { id: number }) => e.id === id).freezeProtection;
}
const test = (engineId: number, body: object, testedAt: string) =>
  request(t.app)
    .post(`/api/engines/${engineId}/coolant-tests`)
    .set(as('technician'))
    .send({ method: 'refractometer', testedAt, ...body })
    .expect(201);

describe('fleet list: freeze protection from the latest coolant test against the site design low', () => {
  it('an engine without a glycol or freeze-point test carries no verdict; with no design low it is unknown', async () => {
    await test(pgEngine, { glycolPercent: 40 }, '2026-11-01T10:00:00Z');
    expect(await freezeOf(quietEngine)).toBeUndefined();
    const f = await freezeOf(pgEngine);
    expect(f).toMatchObject({ status: 'unknown', designLowC: null, requiredC: null });
    expect(f!.freezePointC).toBeCloseTo(-20.6, 6); // Lange 15th ed. table 5.13: PG 40 vol % -> -20.6 °C
  });

  it('design low -20 °C less 5 K = -25 °C: PG 40 vol % (-20.6 °C, Lange table 5.13) is short, with its action', async () => {
    await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: -20 }).expect(200);
    const f = await freezeOf(pgEngine);
    expect(f).toMatchObject({ status: 'short', designLowC: -20, requiredC: -25, marginK: 5 });
    expect(f!.message).toMatch(/short/);
    expect(f!.action).toMatch(/Raise the glycol/);
    const one = await request(t.app).get(`/api/engines/${pgEngine}`).set(as('operator')).expect(200);
    expect(one.body.freezeProtection.status).toBe('short');
  });

  it('boundary: a freeze point equal to design low less margin meets it (design -15.6 °C, -20.6 °C needed)', async () => {
    await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: -15.6 }).expect(200);
    expect((await freezeOf(pgEngine))!.status).toBe('ok');
    await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: -15.5 }).expect(200);
    expect((await freezeOf(pgEngine))!.status).toBe('ok');
    await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: -15.7 }).expect(200);
    expect((await freezeOf(pgEngine))!.status).toBe('short');
  });

  it('the admin margin is applied now: margin 0 K makes -20.6 °C enough for a -20 °C design low', async () => {
    await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: -20 }).expect(200);
    await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ freezeMarginK: 0 }).expect(200);
    expect(await freezeOf(pgEngine)).toMatchObject({ status: 'ok', requiredC: -20, marginK: 0 });
    await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ freezeMarginK: 5 }).expect(200);
  });

  it('the latest test counts, and a measured freeze point is used as measured', async () => {
    await test(pgEngine, { glycolPercent: 50 }, '2026-11-20T10:00:00Z'); // -33.3 °C (Lange table 5.13) meets -25 °C
    expect(await freezeOf(pgEngine)).toMatchObject({ status: 'ok' });
    expect((await freezeOf(pgEngine))!.freezePointC).toBeCloseTo(-33.3, 6);
    await test(pgEngine, { freezePointC: -22 }, '2026-11-25T10:00:00Z');
    expect(await freezeOf(pgEngine)).toMatchObject({ status: 'short', freezePointC: -22 });
    // an older test recorded later does not replace the latest
    await test(pgEngine, { glycolPercent: 50 }, '2026-10-01T10:00:00Z');
    expect(await freezeOf(pgEngine)).toMatchObject({ status: 'short', freezePointC: -22 });
    // a test with no glycol or freeze reading leaves the verdict as it was
    await test(pgEngine, { ph: 9.5 }, '2026-11-30T10:00:00Z');
    expect(await freezeOf(pgEngine)).toMatchObject({ status: 'short', freezePointC: -22 });
  });
});

describe('top-up work order: the step records the coolant added through the top-up service', () => {
  type Step = { id: number; key: string; doneAt: string | null; resultValue: number | null };
  async function startedTopUp(): Promise<{ id: number; add: Step }> {
    const res = await request(t.app)
      .post('/api/work-orders')
      .set(as('planner'))
      .send({ engineId: topUpEngine, kind: 'top-up', assigneeId: t.userIds.technician, dueDate: '2026-12-10' })
      .expect(201);
    await request(t.app).post(`/api/work-orders/${res.body.id}/transition`).set(as('technician')).send({ to: 'in-progress' }).expect(200);
    const o = { id: res.body.id, add: res.body.steps.find((s: Step) => s.key === 'add') };
    await openCap(o.id, res.body.steps);
    return o;
  }
  /** Lock out, then take the cap off: no live data here, so on a manual check (the route for stale data). */
  async function openCap(orderId: number, steps: Step[]): Promise<void> {
    const step = (key: string) => steps.find((s) => s.key === key)!;
    await request(t.app)
      .post(`/api/work-orders/${orderId}/steps/${step('stop-and-lock-out').id}/complete`)
      .set(as('technician'))
      .send({})
      .expect(200);
    await request(t.app)
      .post(`/api/work-orders/${orderId}/steps/${step('relieve-pressure').id}/complete`)
      .set(as('technician'))
      .send({
        lockoutConfirmed: true,
        manualCheck: { gaugeKpa: 0, tempC: 25, minutesSinceStop: 240, checkedBy: 'Test technician', reason: 'no gateway on this engine' },
      })
      .expect(200);
  }
  const complete = (o: { id: number; add: Step }, body: object) =>
    request(t.app).post(`/api/work-orders/${o.id}/steps/${o.add.id}/complete`).set(as('technician')).send(body);

  beforeAll(async () => {
    await test(topUpEngine, { scaUnitsPerGal: 2.0, glycolPercent: 50 }, new Date(Date.now() - 3600_000).toISOString());
  });

  it('coolant goes in only with the cap off: the add step is refused (409, naming the step) until the cap-off step is done', async () => {
    const res = await request(t.app)
      .post('/api/work-orders')
      .set(as('planner'))
      .send({ engineId: topUpEngine, kind: 'top-up', assigneeId: t.userIds.technician, dueDate: '2026-12-10' })
      .expect(201);
    await request(t.app).post(`/api/work-orders/${res.body.id}/transition`).set(as('technician')).send({ to: 'in-progress' }).expect(200);
    const steps: (Step & { position: number; after: string[] })[] = res.body.steps;
    const add = steps.find((s) => s.key === 'add')!;
    const capOff = steps.find((s) => s.key === 'relieve-pressure')!;
    const detail = await request(t.app).get(`/api/work-orders/${res.body.id}`).set(as('technician')).expect(200);
    expect(detail.body.steps.find((s: Step) => s.key === 'add').after).toEqual(['relieve-pressure']);
    const refused = await complete({ id: res.body.id, add }, { value: 5, unit: 'L', topUp: { liquid: 'water' } }).expect(409);
    expect(refused.body.error).toBe(`do step ${capOff.position} first: Relieve the pressure and take off the filler cap`);
    expect((await request(t.app).get(`/api/engines/${topUpEngine}/coolant-top-ups`).set(as('operator')).expect(200)).body.topUps).toHaveLength(0);
    // the lock-out step alone does not open it either
    await request(t.app)
      .post(`/api/work-orders/${res.body.id}/steps/${steps.find((s) => s.key === 'stop-and-lock-out')!.id}/complete`)
      .set(as('technician'))
      .send({})
      .expect(200);
    await complete({ id: res.body.id, add }, { value: 5, unit: 'L', topUp: { liquid: 'water' } }).expect(409);
    // once the cap is off it goes through: the tests below (startedTopUp opens the cap first)
    await request(t.app).post(`/api/work-orders/${res.body.id}/transition`).set(as('planner')).send({ to: 'cancelled', note: 'test order' });
  });

  it('bad input is 400 naming the field, and the step stays open', async () => {
    const o = await startedTopUp();
    expect((await complete(o, { value: 5, unit: 'L' }).expect(400)).body.field).toBe('liquid');
    expect((await complete(o, { value: 5, unit: 'L', topUp: { liquid: 'juice' } }).expect(400)).body.field).toMatch(/liquid/);
    expect((await complete(o, { value: 5, unit: 'L', topUp: { liquid: 'premix' } }).expect(400)).body.field).toBe('premixPercent');
    expect((await complete(o, { value: 50, unit: 'L', topUp: { liquid: 'water' } }).expect(400)).body.field).toBe('value'); // over the 40 L system
    expect((await complete(o, { value: 0, unit: 'L', topUp: { liquid: 'water' } }).expect(400)).body.field).toBe('value');
    const detail = await request(t.app).get(`/api/work-orders/${o.id}`).set(as('technician')).expect(200);
    expect(detail.body.steps.find((s: Step) => s.key === 'add').doneAt).toBeNull();
    expect((await request(t.app).get(`/api/engines/${topUpEngine}/coolant-top-ups`).set(as('operator')).expect(200)).body.topUps).toHaveLength(0);
    // a top-up on another step is refused
    const other = (await request(t.app).get(`/api/work-orders/${o.id}`).set(as('technician'))).body.steps.find((s: Step) => s.key === 'check-level');
    expect(
      (
        await request(t.app)
          .post(`/api/work-orders/${o.id}/steps/${other.id}/complete`)
          .set(as('technician'))
          .send({ topUp: { liquid: 'water' } })
          .expect(400)
      ).body.field,
    ).toBe('topUp');
  });

  it('10 L of plain water into 40 L: step done, top-up stored with the order, additive 2.0 x 0.75 = 1.50, glycol 50 x 0.75 = 37.5 %', async () => {
    const o = await startedTopUp();
    const res = await complete(o, { value: 10, unit: 'L', note: 'hose weep found', topUp: { liquid: 'water' } }).expect(200);
    expect(res.body.steps.find((s: Step) => s.key === 'add')).toMatchObject({ resultValue: 10, resultText: 'Plain water: hose weep found' });
    const list = await request(t.app).get(`/api/engines/${topUpEngine}/coolant-top-ups`).set(as('operator')).expect(200);
    expect(list.body.topUps[0]).toMatchObject({ volumeL: 10, liquid: 'water', premixPercent: null, workOrderId: o.id, addedBy: t.userIds.technician });
    expect(list.body.topUps[0].notes).toMatch(new RegExp(`Work order #${o.id}: hose weep found`));
    expect(list.body.estimate.scaUnitsPerGal).toBeCloseTo(1.5, 12);
    expect(list.body.estimate.glycolPercent).toBeCloseTo(37.5, 12);
    expect(list.body.estimate.belowLow).toBe(false);
    await complete(o, { value: 1, unit: 'L', topUp: { liquid: 'water' } }).expect(409); // already done
  });

  it('2 US gal of 50 % premix typed in gallons (7.570823568 L, NIST SP 811): additive 1.5 x (1 - 7.5708/40) = 1.2161; a test is asked for below 1.2', async () => {
    const o = await startedTopUp();
    await complete(o, { value: 2, unit: 'gal', topUp: { liquid: 'premix', premixPercent: 50 } }).expect(200);
    const list = await request(t.app).get(`/api/engines/${topUpEngine}/coolant-top-ups`).set(as('operator')).expect(200);
    expect(list.body.topUps[0].volumeL).toBeCloseTo(7.570823568, 9);
    const f = 7.570823568 / 40;
    expect(list.body.estimate.scaUnitsPerGal).toBeCloseTo(1.5 * (1 - f), 12);
    expect(list.body.estimate.glycolPercent).toBeCloseTo(37.5 * (1 - f) + 50 * f, 12);
    expect(list.body.estimate.belowLow).toBe(false); // 1.216 >= 1.2
    const o2 = await startedTopUp();
    await complete(o2, { value: 1, unit: 'L', topUp: { liquid: 'glycol' } }).expect(200); // 1.2161 x 0.975 = 1.1857 < 1.2
    const after = await request(t.app).get(`/api/engines/${topUpEngine}/coolant-top-ups`).set(as('operator')).expect(200);
    expect(after.body.estimate.scaUnitsPerGal).toBeCloseTo(1.5 * (1 - f) * 0.975, 12);
    expect(after.body.estimate.belowLow).toBe(true);
    expect(after.body.estimate.reasons.join(' ')).toMatch(/test the coolant now/);
  });

  it('a test with nitrite only: 1000 ppm, then 9 L of water into 40 L -> 775 ppm, below the 800 ppm limit: a test is asked for', async () => {
    await test(quietEngine, { nitritePpm: 1000 }, new Date(Date.now() - 3600_000).toISOString());
    await request(t.app).post(`/api/engines/${quietEngine}/coolant-top-ups`).set(as('technician')).send({ volumeL: 9, liquid: 'water' }).expect(201);
    const list = await request(t.app).get(`/api/engines/${quietEngine}/coolant-top-ups`).set(as('operator')).expect(200);
    expect(list.body.estimate.nitritePpm).toBeCloseTo(775, 9);
    expect(list.body.estimate.belowLow).toBe(true);
    expect(list.body.estimate.reasons.join(' ')).toMatch(/below 800 ppm: test the coolant now/);
  });
});
