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
  engineId = (await t.ctx.models.Engine.create({
    siteId, name: 'Fire pump 1', duty: 'standby', glycolType: 'propylene', glycolPercent: 40, capPressureKpa: 100, oilDrainIntervalH: 250, capacityL: 40, coolantFamily: 'conventional',
  })).id;
});
afterAll(() => t.close());

const as = (role: keyof TestApp['tokens']) => auth(t.tokens[role]);
const record = (body: object, role: keyof TestApp['tokens'] = 'technician') => request(t.app).post(`/api/engines/${engineId}/coolant-tests`).set(as(role)).send({ method: 'lab', ...body });

describe('site design low temperature', () => {
  it('admin sets designLowTempC by PATCH; others may not; bad values are 400 naming the field', async () => {
    await request(t.app).patch(`/api/sites/${siteId}`).set(as('technician')).send({ designLowTempC: -30 }).expect(403);
    expect((await request(t.app).patch(`/api/sites/${siteId}`).set(as('admin')).send({ designLowTempC: 'cold' }).expect(400)).body.field).toBe('designLowTempC');
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

  it('the new fields are optional; bad values are 400 naming the field', async () => {
    const res = await record({ glycolPercent: 55 }).expect(201);
    expect(res.body.nitritePpm).toBeNull();
    for (const [field, value] of [['nitritePpm', -1], ['molybdatePpm', 'lots'], ['reserveAlkalinityMl', 1000]] as const) {
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
    const res = await request(t.app).post('/api/coolant-tests/import').set(as('technician')).attach('file', Buffer.from(csv), { filename: 'lab.csv', contentType: 'text/csv' }).expect(201);
    expect(res.body.stored).toBe(1);
    const row = await t.ctx.models.CoolantTest.findOne({ where: { engineId, source: 'lab-import' } });
    expect(row!.toJSON()).toMatchObject({ nitritePpm: 4000, molybdatePpm: 200 });
    const findings = (row!.decision as { findings: { field: string; status: string }[] }).findings;
    expect(findings.map((f) => [f.field, f.status])).toEqual([['nitritePpm', 'high'], ['molybdatePpm', 'low'], ['ph', 'ok']]);
  });
});
