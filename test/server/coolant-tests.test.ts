/**
 * Coolant tests and the lab CSV import through HTTP, on a real SQLite file.
 * Additive limits 1.2 to 3.0 units/US gal and the low dose (one US pint per 4 US gal): common practice.
 * Freeze point of 50 vol % PG: -33.3 °C, Lange's Handbook of Chemistry 15th ed., table 5.13.
 */
import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let conv: number;
let elc: number;
const GAL = 3.785411784; // NIST SP 811
beforeAll(async () => {
  t = await makeTestApp();
  const site = await t.ctx.models.Site.create({ name: 'North pumping station', timeZone: 'Europe/Oslo' });
  const base = { siteId: site.id, duty: 'standby' as const, glycolType: 'propylene' as const, glycolPercent: 50, capPressureKpa: 100, oilDrainIntervalH: 250 };
  conv = (await t.ctx.models.Engine.create({ ...base, name: 'Pump set A', capacityL: 20 * GAL, coolantFamily: 'conventional' })).id;
  elc = (await t.ctx.models.Engine.create({ ...base, name: 'Pump set B', capacityL: 60, coolantFamily: 'extended-life' })).id;
});
afterAll(() => t.close());

const as = (role: keyof TestApp['tokens']) => auth(t.tokens[role]);

describe('recording a coolant test', () => {
  it('stores the decision with its reasons for conventional coolant (low -> charged filter and the dose for this capacity)', async () => {
    const res = await request(t.app)
      .post(`/api/engines/${conv}/coolant-tests`)
      .set(as('technician'))
      .send({ method: 'strip', scaUnitsPerGal: 0.8, glycolPercent: 50, freezePointC: -33, ph: 9.8, conductivityUsCm: 3100, appearance: 'clear' })
      .expect(201);
    expect(res.body.decision.additive).toMatchObject({ status: 'low', filter: 'charged', liquidAdditiveL: 2.35 });
    expect(res.body.decision.additive.reasons[0]).toMatch(/Additive low/);
    expect(res.body.decision.freeze.freezePointC).toBeCloseTo(-33.3, 6); // Lange's table 5.13
    expect(res.body.testedByName).toBe('Test technician');
    const list = await request(t.app).get(`/api/engines/${conv}/coolant-tests`).set(as('operator')).expect(200);
    expect(list.body[0].decision.additive.status).toBe('low');
    expect(list.body[0].source).toBe('manual');
  });

  it.each([
    [1.2, 'in-range', 'charged'],
    [3.0, 'in-range', 'charged'],
    [3.01, 'high', 'blank'],
  ])('strip %f -> %s / %s filter', async (sca, status, filter) => {
    const res = await request(t.app).post(`/api/engines/${conv}/coolant-tests`).set(as('planner')).send({ method: 'strip', scaUnitsPerGal: sca }).expect(201);
    expect(res.body.decision.additive).toMatchObject({ status, filter, liquidAdditiveL: 0 });
  });

  it('extended-life coolant: no strip decision, and the record says why', async () => {
    const res = await request(t.app).post(`/api/engines/${elc}/coolant-tests`).set(as('technician')).send({ method: 'strip', scaUnitsPerGal: 0.5 }).expect(201);
    expect(res.body.decision.additive).toMatchObject({ status: 'not-applicable', filter: null, liquidAdditiveL: 0 });
    expect(res.body.decision.additive.reasons.join(' ')).toMatch(/Extended-life coolant/);
  });

  it('without an additive reading: no filter decision, noted', async () => {
    const res = await request(t.app)
      .post(`/api/engines/${conv}/coolant-tests`)
      .set(as('technician'))
      .send({ method: 'refractometer', glycolPercent: 40 })
      .expect(201);
    expect(res.body.decision.additive).toBeNull();
    expect(res.body.decision.notes[0]).toMatch(/No additive reading/);
  });

  it('operators read but do not record; bad values are 400 naming the field; unknown engine 404', async () => {
    await request(t.app).post(`/api/engines/${conv}/coolant-tests`).set(as('operator')).send({ method: 'strip', scaUnitsPerGal: 2 }).expect(403);
    for (const [field, value] of [
      ['scaUnitsPerGal', -1],
      ['ph', 15],
      ['glycolPercent', 'half'],
      ['method', 'guess'],
      ['conductivityUsCm', 1e9],
    ] as const) {
      const res = await request(t.app)
        .post(`/api/engines/${conv}/coolant-tests`)
        .set(as('technician'))
        .send({ method: 'strip', [field]: value })
        .expect(400);
      expect(res.body.field).toBe(field);
    }
    const future = new Date(Date.now() + 86400000).toISOString();
    expect(
      (
        await request(t.app)
          .post(`/api/engines/${conv}/coolant-tests`)
          .set(as('technician'))
          .send({ method: 'strip', scaUnitsPerGal: 2, testedAt: future })
          .expect(400)
      ).body.field,
    ).toBe('testedAt');
    // the same rule for a top-up; a clock a few minutes ahead (within the 5 minutes telemetry is allowed) is accepted
    const topUp = await request(t.app)
      .post(`/api/engines/${conv}/coolant-top-ups`)
      .set(as('technician'))
      .send({ volumeL: 2, liquid: 'water', addedAt: future })
      .expect(400);
    expect(topUp.body).toMatchObject({ field: 'addedAt', error: expect.stringMatching(/^addedAt: is in the future/) });
    await request(t.app)
      .post(`/api/engines/${conv}/coolant-tests`)
      .set(as('technician'))
      .send({ method: 'strip', scaUnitsPerGal: 2, testedAt: Date.now() + 4 * 60_000 })
      .expect(201);
    await request(t.app).post('/api/engines/9999/coolant-tests').set(as('technician')).send({ method: 'strip', scaUnitsPerGal: 2 }).expect(404);
  });
});

describe('lab CSV import', () => {
  const header = 'engine_id,tested_at,method,sca_units_per_gal,glycol_percent,freeze_point_c,ph,conductivity_us_cm,appearance';
  const upload = (csv: string | Buffer, query = '', role: keyof TestApp['tokens'] = 'technician') =>
    request(t.app)
      .post(`/api/coolant-tests/import${query}`)
      .set(as(role))
      .attach('file', Buffer.isBuffer(csv) ? csv : Buffer.from(csv, 'utf8'), { filename: 'lab.csv', contentType: 'text/csv' });
  const count = () => t.ctx.models.CoolantTest.count({ where: { source: 'lab-import' } });

  it('a good file: every row stored with its decision', async () => {
    const csv =
      [header, `${conv},2026-01-10T09:00:00Z,lab,1.8,49.5,-32.5,9.6,2900,"clear, light yellow"`, `${elc},2026-01-10,lab,,51,-34,8.4,2500,clear`].join('\r\n') +
      '\r\n';
    const res = await upload(csv).expect(201);
    expect(res.body).toMatchObject({ preview: false, stored: 2, rejected: [] });
    expect(res.body.accepted.map((a: { status: string }) => a.status)).toEqual(['in-range', 'not-applicable']);
    const rows = await t.ctx.models.CoolantTest.findAll({ where: { source: 'lab-import' }, order: [['id', 'ASC']] });
    expect(rows[0].appearance).toBe('clear, light yellow');
    expect(rows[0].toJSON()).toMatchObject({ scaUnitsPerGal: 1.8, glycolPercent: 49.5, freezePointC: -32.5, ph: 9.6, conductivityUsCm: 2900, method: 'lab' });
    expect(new Date(rows[1].testedAt).toISOString()).toBe('2026-01-10T00:00:00.000Z');
  });

  it('a file with bad rows: preview reports them per row and stores nothing; import stores only the good ones', async () => {
    const csv = [
      header,
      `${conv},2026-02-01T08:00:00+01:00,strip,2.2,50,,,,`,
      `${conv},yesterday,strip,2.2,50,,,,`,
      `${conv},2026-02-01T08:00:00Z,strip,lots,50,,,,`,
      `9999,2026-02-01T08:00:00Z,lab,2,50,,,,`,
      `${conv},2026-02-01T08:00:00Z,lab,2,50`,
      `${conv},2026-02-02T08:00:00Z,lab,,,,7.9,,`,
    ].join('\n');
    const before = await count();
    const preview = await upload(csv, '?preview=1').expect(200);
    expect(preview.body.preview).toBe(true);
    expect(preview.body.accepted.map((a: { line: number }) => a.line)).toEqual([2, 7]);
    expect(preview.body.rejected.map((e: { line: number; field: string | null }) => [e.line, e.field])).toEqual([
      [3, 'tested_at'],
      [4, 'sca_units_per_gal'],
      [5, 'engine_id'],
      [6, null],
    ]);
    expect(await count()).toBe(before);
    const res = await upload(csv).expect(201);
    expect(res.body.stored).toBe(2);
    expect(res.body.rejected).toHaveLength(4);
    expect(await count()).toBe(before + 2);
  });

  it('for one engine: engine_id may be left out, and rows for another engine are refused', async () => {
    const csv = ['tested_at,glycol_percent,engine_id', '2026-03-01,45,', `2026-03-01,45,${elc}`].join('\n');
    const res = await upload(csv, `?engineId=${conv}&preview=1`).expect(200);
    expect(res.body.accepted).toHaveLength(1);
    expect(res.body.rejected[0]).toMatchObject({ line: 3, field: 'engine_id' });
  });

  it('a huge file is 413 and stores nothing', async () => {
    const before = await count();
    const row = `${conv},2026-01-10T09:00:00Z,lab,1.8,49.5,-32.5,9.6,2900,clear\n`;
    const big = header + '\n' + row.repeat(Math.ceil((2.1 * 1024 * 1024) / row.length));
    const res = await upload(big).expect(413);
    expect(res.body.field).toBe('file');
    expect(await count()).toBe(before);
  });

  it('a file that is not CSV is 400: binary, and text of another layout', async () => {
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
    expect((await upload(png).expect(400)).body.field).toBe('file');
    expect((await upload('{"tests": [1, 2, 3]}').expect(400)).body.error).toMatch(/not a lab CSV/);
    expect((await upload('name;value\nsca;2\n').expect(400)).body.field).toBe('file');
  });

  it('operators may not import; no file is 400', async () => {
    await upload(header + '\n', '', 'operator').expect(403);
    const res = await request(t.app).post('/api/coolant-tests/import').set(as('technician')).send({}).expect(400);
    expect(res.body.field).toBe('file');
  });
});

describe('run hours correction', () => {
  it('planner sets the hour meter value with a reason; audit keeps old, new, who, why', async () => {
    await t.ctx.models.Engine.update({ runHours: 100 }, { where: { id: conv } });
    await request(t.app).post(`/api/engines/${conv}/run-hours`).set(as('technician')).send({ runHours: 120, reason: 'hour meter' }).expect(403);
    expect((await request(t.app).post(`/api/engines/${conv}/run-hours`).set(as('planner')).send({ runHours: 120 }).expect(400)).body.field).toBe('reason');
    expect(
      (await request(t.app).post(`/api/engines/${conv}/run-hours`).set(as('planner')).send({ runHours: -5, reason: 'x y z' }).expect(400)).body.field,
    ).toBe('runHours');
    const res = await request(t.app)
      .post(`/api/engines/${conv}/run-hours`)
      .set(as('planner'))
      .send({ runHours: 123.4, reason: 'read from the hour meter at the monthly run' })
      .expect(200);
    expect(res.body).toMatchObject({ oldRunHours: 100, runHours: 123.4 });
    expect((await t.ctx.models.Engine.findByPk(conv))!.runHours).toBe(123.4);
    const audit = await request(t.app).get(`/api/engines/${conv}/run-hours`).set(as('operator')).expect(200);
    expect(audit.body[0]).toMatchObject({
      oldRunHours: 100,
      newRunHours: 123.4,
      userId: t.userIds.planner,
      reason: 'read from the hour meter at the monthly run',
    });
  });
});
