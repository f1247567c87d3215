/**
 * Inhibitor chemistry and the site's design low temperature through HTTP, on a real SQLite file.
 * Limits (defaults): nitrite 800-3200 ppm, molybdate 300-1500 ppm, reserve alkalinity >= 5.0 mL (common practice,
 * from memory); pH 7.5-11.0 (ASTM D3306 / D6210, from memory); freeze margin 5 K (common practice).
 * Freeze points: Lange's Handbook of Chemistry 15th ed., table 5.13 (propylene glycol by volume).
 */
import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let siteId: number;
let engineId: number;
beforeAll(async () => {
  t = await makeTestApp();
  siteId = (await t.ctx.models.Site.create({ name: 'Hill reservoir', timeZone: 'America/Denver' })).id;
  engineId = (
    await t.ctx.models.Engine.create({
      siteId,
      name: 'Fire pump 1',
      duty: 'standby',
      glycolType: 'propylene',
      glycolPercent: 40,
      capPressureKpa: 100,
      oilDrainIntervalH: 250,
      capacityL: 40,
      coolantFamily: 'conventional',
    })
  ).id;
});
afterAll(() => t.close());

const as = (role: keyof TestApp['tokens']) => auth(t.tokens[role]);
const record = (body: object, role: keyof TestApp['tokens'] = 'technician') =>
  request(t.app)
    .post(`/api/engines/${engineId}/coolant-tests`)
    .set(as(role))
    .send({ method: 'lab', ...body });

describe('site design low temperature', () => {
  it('admin sets designLowTempC by PATCH; others may not; bad values are 400 naming the field', async () => {
    await request(t.app).patch(`/api/sites/${siteId}`).set(as('technician')).send({ designLowTempC: -30 }).expect(403);
    expect((await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: 'cold' }).expect(400)).body.field).toBe(
      'designLowTempC',
    );
    expect((await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: -100 }).expect(400)).body.field).toBe('designLowTempC');
    const res = await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: -30 }).expect(200);
    expect(res.body.designLowTempC).toBe(-30);
    const list = await request(t.app).get('/api/sites').set(as('operator')).expect(200);
    expect(list.body.find((s: { id: number }) => s.id === siteId).designLowTempC).toBe(-30);
  });
});

describe('a coolant test with inhibitor readings', () => {
  it('low nitrite and a freeze point short of the design low: both findings with their actions, stored and listed', async () => {
    const res = await record({ nitritePpm: 600, molybdatePpm: 350, ph: 9.2, reserveAlkalinityMl: 7.5, freezePointC: -28, glycolPercent: 45 }).expect(201);
    expect(res.body).toMatchObject({ nitritePpm: 600, molybdatePpm: 350, reserveAlkalinityMl: 7.5 });
    const f = Object.fromEntries(res.body.decision.findings.map((x: { field: string }) => [x.field, x]));
    expect(f.nitritePpm).toMatchObject({ status: 'low' });
    expect(f.nitritePpm.action).toMatch(/additive/);
    expect(f.molybdatePpm.status).toBe('ok');
    expect(f.ph.status).toBe('ok');
    expect(f.reserveAlkalinityMl.status).toBe('ok');
    // design low -30 °C less 5 K = -35 °C; measured -28 °C is short
    expect(f.freezeProtection).toMatchObject({ status: 'short', value: -28 });
    expect(f.freezeProtection.message).toMatch(/-35\.0 °C/);
    expect(f.freezeProtection.action).toMatch(/Raise the glycol/);
    const list = await request(t.app).get(`/api/engines/${engineId}/coolant-tests`).set(as('operator')).expect(200);
    expect(list.body[0].nitritePpm).toBe(600);
    expect(list.body[0].decision.findings).toHaveLength(5);
  });

  it('freeze protection from the glycol share: PG 50 vol % = -33.3 °C (Lange) is short of -35; pH 7.4 is low', async () => {
    const res = await record({ glycolPercent: 50, ph: 7.4 }).expect(201);
    const f = Object.fromEntries(res.body.decision.findings.map((x: { field: string }) => [x.field, x]));
    expect(f.freezeProtection.value).toBeCloseTo(-33.3, 6);
    expect(f.freezeProtection.status).toBe('short');
    expect(f.ph.status).toBe('low');
  });

  it('glycol-breakdown signs: stored, judged with their action, listed; an unknown sign is 400 naming the field', async () => {
    const res = await record({ breakdownSigns: ['sludge'], ph: 7.2 }).expect(201);
    expect(res.body.breakdownSigns).toEqual(['sludge']);
    const f = res.body.decision.findings.find((x: { field: string }) => x.field === 'breakdownSigns');
    expect(f).toMatchObject({ status: 'signs' });
    expect(f.message).toMatch(/sludge or sediment, with a low pH/);
    expect(f.action).toMatch(/drain, flush and refill/);
    const none = await record({ breakdownSigns: [], ph: 9 }).expect(201);
    expect(none.body.breakdownSigns).toEqual([]);
    expect(none.body.decision.findings.find((x: { field: string }) => x.field === 'breakdownSigns').status).toBe('ok');
    expect((await record({ ph: 9 }).expect(201)).body.breakdownSigns).toBeNull();
    expect((await record({ breakdownSigns: ['green'] }).expect(400)).body.field).toMatch(/breakdownSigns/);
    expect((await record({ breakdownSigns: 'sludge' }).expect(400)).body.field).toMatch(/breakdownSigns/);
  });

  it('the new fields are optional; bad values are 400 naming the field', async () => {
    const res = await record({ glycolPercent: 55 }).expect(201);
    expect(res.body.nitritePpm).toBeNull();
    for (const [field, value] of [
      ['nitritePpm', -1],
      ['molybdatePpm', 'lots'],
      ['reserveAlkalinityMl', 1000],
    ] as const) {
      expect((await record({ [field]: value }).expect(400)).body.field).toBe(field);
    }
  });
});

describe('chemistry limits (admin setting)', () => {
  it('defaults until set; admin changes them, the next test is judged by them; others may not; bad limits 400', async () => {
    const get = await request(t.app).get('/api/coolant-limits').set(as('operator')).expect(200);
    expect(get.body).toMatchObject({ configured: false, limits: { nitriteLowPpm: 800, freezeMarginK: 5 } });
    await request(t.app).put('/api/coolant-limits').set(as('planner')).send({ nitriteLowPpm: 500 }).expect(403);
    expect((await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ nitriteLowPpm: 5000 }).expect(400)).body.field).toBe('nitriteHighPpm');
    expect((await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ phLow: 'x' }).expect(400)).body.field).toBe('phLow');
    const put = await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ nitriteLowPpm: 500, freezeMarginK: 0 }).expect(200);
    expect(put.body).toMatchObject({ configured: true, limits: { nitriteLowPpm: 500, nitriteHighPpm: 3200, freezeMarginK: 0 } });
    const res = await record({ nitritePpm: 600, freezePointC: -31 }).expect(201);
    expect(res.body.decision.findings.map((x: { status: string }) => x.status)).toEqual(['ok', 'ok']);
    await request(t.app).put('/api/coolant-limits').set(as('admin')).send({}).expect(200);
  });
});

describe('lab CSV with nitrite and molybdate columns', () => {
  it('stores them and judges them', async () => {
    const csv = ['engine_id,tested_at,nitrite_ppm,molybdate_ppm,ph', `${engineId},2026-04-01,4000,200,8.8`].join('\n');
    const res = await request(t.app)
      .post('/api/coolant-tests/import')
      .set(as('technician'))
      .attach('file', Buffer.from(csv), { filename: 'lab.csv', contentType: 'text/csv' })
      .expect(201);
    expect(res.body.stored).toBe(1);
    const row = await t.ctx.models.CoolantTest.findOne({ where: { engineId, source: 'lab-import' } });
    expect(row!.toJSON()).toMatchObject({ nitritePpm: 4000, molybdatePpm: 200 });
    const findings = (row!.decision as { findings: { field: string; status: string }[] }).findings;
    expect(findings.map((f) => [f.field, f.status])).toEqual([
      ['nitritePpm', 'high'],
      ['molybdatePpm', 'low'],
      ['ph', 'ok'],
    ]);
  });
});

describe('coolant top-ups and the additive estimate (mass balance; low limit 1.2 units/US gal, common practice)', () => {
  let eid: number;
  beforeAll(async () => {
    eid = (
      await t.ctx.models.Engine.create({
        siteId,
        name: 'Fire pump 2',
        duty: 'standby',
        glycolType: 'ethylene',
        glycolPercent: 40,
        capPressureKpa: 100,
        oilDrainIntervalH: 250,
        capacityL: 40,
        coolantFamily: 'conventional',
      })
    ).id;
  });
  const url = () => `/api/engines/${eid}/coolant-tests`;
  const topUps = () => `/api/engines/${eid}/coolant-top-ups`;

  it('no test yet: the top-ups are listed without an estimate', async () => {
    await request(t.app)
      .post(topUps())
      .set(as('technician'))
      .send({ volumeL: 1, liquid: 'water', addedAt: Date.now() - 3 * 3600_000 })
      .expect(201);
    const res = await request(t.app).get(topUps()).set(as('operator')).expect(200);
    expect(res.body.topUps).toHaveLength(1);
    expect(res.body.estimate).toBeNull();
  });

  it('after a test at 2.0 units/gal and 40 %: 4 L water then 4 L 50 % premix -> 1.62 units/gal, 37.4 % (hand arithmetic)', async () => {
    await request(t.app)
      .post(url())
      .set(as('technician'))
      .send({ method: 'strip', scaUnitsPerGal: 2.0, glycolPercent: 40, testedAt: Date.now() - 2 * 3600_000 })
      .expect(201);
    await request(t.app)
      .post(topUps())
      .set(as('technician'))
      .send({ volumeL: 4, liquid: 'water', addedAt: Date.now() - 3600_000 })
      .expect(201);
    const p = await request(t.app)
      .post(topUps())
      .set(as('planner'))
      .send({ volumeL: 4, liquid: 'premix', premixPercent: 50, notes: 'after hose repair' })
      .expect(201);
    expect(p.body).toMatchObject({ liquid: 'premix', premixPercent: 50, notes: 'after hose repair' });
    const res = await request(t.app).get(topUps()).set(as('operator')).expect(200);
    expect(res.body.topUps).toHaveLength(3);
    expect(res.body.estimate.topUpsSince).toBe(2);
    expect(res.body.estimate.scaUnitsPerGal).toBeCloseTo(1.62, 9);
    expect(res.body.estimate.glycolPercent).toBeCloseTo(37.4, 9);
    expect(res.body.estimate.belowLow).toBe(false);
  });

  it('enough water to fall below the low limit suggests a test', async () => {
    await request(t.app).post(topUps()).set(as('technician')).send({ volumeL: 12, liquid: 'water' }).expect(201);
    const res = await request(t.app).get(topUps()).set(as('operator')).expect(200);
    expect(res.body.estimate.scaUnitsPerGal).toBeCloseTo(1.62 * 0.7, 9);
    expect(res.body.estimate.belowLow).toBe(true);
    expect(res.body.estimate.reasons.join(' ')).toMatch(/test the coolant now/);
  });

  it('bad input is 400 naming the field; operators may not record', async () => {
    await request(t.app).post(topUps()).set(as('operator')).send({ volumeL: 1, liquid: 'water' }).expect(403);
    for (const [body, field] of [
      [{ volumeL: 0, liquid: 'water' }, 'volumeL'],
      [{ volumeL: 41, liquid: 'water' }, 'volumeL'],
      [{ volumeL: 1, liquid: 'juice' }, 'liquid'],
      [{ volumeL: 1, liquid: 'premix' }, 'premixPercent'],
      [{ volumeL: 1, liquid: 'water', addedAt: Date.now() + 86400_000 }, 'addedAt'],
    ] as const) {
      expect((await request(t.app).post(topUps()).set(as('technician')).send(body).expect(400)).body.field).toBe(field);
    }
    await request(t.app).get('/api/engines/99999/coolant-top-ups').set(as('operator')).expect(404);
  });
});

describe('extended-life coolant extender interval (admin setting; default common practice, from memory)', () => {
  it('the plan of an extended-life engine has the extender; the admin sets its interval; bad intervals 400', async () => {
    const eid = (
      await t.ctx.models.Engine.create({
        siteId,
        name: 'Gen-set ELC',
        duty: 'prime',
        glycolType: 'ethylene',
        glycolPercent: 50,
        capPressureKpa: 100,
        oilDrainIntervalH: 500,
        capacityL: 80,
        coolantFamily: 'extended-life',
      })
    ).id;
    const plan = async () =>
      (await request(t.app).get(`/api/engines/${eid}/service-plan`).set(as('operator')).expect(200)).body as {
        key: string;
        everyHours: number | null;
        everyDays: number | null;
        placeholder?: boolean;
      }[];
    expect((await plan()).find((x) => x.key === 'coolant-extender')).toMatchObject({ everyHours: 6000, everyDays: 1095, placeholder: true });
    expect(
      (
        await request(t.app)
          .put('/api/coolant-limits')
          .set(as('admin'))
          .send({ extender: { everyHours: 0 } })
          .expect(400)
      ).body.field,
    ).toBe('extender.everyHours');
    expect((await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ extender: {} }).expect(400)).body.field).toBe('extender');
    const put = await request(t.app)
      .put('/api/coolant-limits')
      .set(as('admin'))
      .send({ extender: { everyHours: 4000, everyDays: 730 } })
      .expect(200);
    expect(put.body.extender).toEqual({ everyHours: 4000, everyDays: 730 });
    expect((await plan()).find((x) => x.key === 'coolant-extender')).toMatchObject({ everyHours: 4000, everyDays: 730 });
    expect((await plan()).find((x) => x.key === 'coolant-extender')!.placeholder).toBeFalsy();
    // a later limits change keeps the interval; null goes back to the default
    await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ phLow: 7.5 }).expect(200);
    expect((await request(t.app).get('/api/coolant-limits').set(as('operator')).expect(200)).body.extender).toEqual({ everyHours: 4000, everyDays: 730 });
    await request(t.app).put('/api/coolant-limits').set(as('admin')).send({ extender: null }).expect(200);
    expect((await plan()).find((x) => x.key === 'coolant-extender')).toMatchObject({ everyHours: 6000, placeholder: true });
  });
});
