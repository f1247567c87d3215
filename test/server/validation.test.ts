import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let siteId: number;
beforeAll(async () => {
  t = await makeTestApp();
  siteId = (await t.ctx.models.Site.create({ name: 'Valley works', timeZone: 'America/Denver' })).id;
});
afterAll(() => t.close());

const admin = () => auth(t.tokens.admin);
const goodEngine = () => ({ siteId, name: 'Gen-set 1', capacityL: 80, capPressureKpa: 100, glycolPercent: 50, oilDrainIntervalH: 250, heaterSetpointC: 40 });

describe('validation names the field', () => {
  it.each([
    ['capacityL', 0],
    ['capacityL', 5001],
    ['capPressureKpa', -1],
    ['capPressureKpa', 301],
    ['glycolPercent', 71],
    ['oilDrainIntervalH', 49],
    ['oilDrainIntervalH', 5001],
    ['safeOpenTempC', 19],
    ['safeOpenTempC', 71],
    ['duty', 'sometimes'],
    ['coolantFamily', 'mystery'],
    ['name', ''],
    ['capacityL', '80'],
  ])('engine %s = %p is 400', async (field, value) => {
    const res = await request(t.app)
      .post('/api/engines')
      .set(admin())
      .send({ ...goodEngine(), [field]: value })
      .expect(400);
    expect(res.body.field).toBe(field);
    expect(typeof res.body.error).toBe('string');
  });

  it('accepts the edges of the ranges and stores SI values, answering in camelCase', async () => {
    const res = await request(t.app)
      .post('/api/engines')
      .set(admin())
      .send({ ...goodEngine(), capacityL: 5000, capPressureKpa: 0, glycolPercent: 70, safeOpenTempC: 20 })
      .expect(201);
    expect(res.body).toMatchObject({
      siteId,
      capacityL: 5000,
      capPressureKpa: 0,
      glycolPercent: 70,
      safeOpenTempC: 20,
      duty: 'standby',
      runState: 'no-data',
      latest: {},
      lastSeenAt: null,
    });
    expect(res.body.activeAlarms).toBeUndefined();
    expect(res.body.capacity_l).toBeUndefined();
  });

  it('rejects an unknown field by name', async () => {
    const res = await request(t.app)
      .post('/api/engines')
      .set(admin())
      .send({ ...goodEngine(), capacityGal: 20 })
      .expect(400);
    expect(res.body.field).toBe('capacityGal');
  });

  it('rejects an engine on a site that does not exist', async () => {
    const res = await request(t.app)
      .post('/api/engines')
      .set(admin())
      .send({ ...goodEngine(), siteId: 9999 })
      .expect(400);
    expect(res.body.field).toBe('siteId');
  });

  it('rejects a time zone that is not IANA', async () => {
    const res = await request(t.app).post('/api/sites').set(admin()).send({ name: 'X', timeZone: 'Mars/Olympus' }).expect(400);
    expect(res.body.field).toBe('timeZone');
  });

  it('rejects a short password, a bad role and a duplicate e-mail', async () => {
    const base = { email: 'someone@example.test', name: 'Some One', password: 'long-enough-pw', role: 'operator' };
    expect(
      (
        await request(t.app)
          .post('/api/users')
          .set(admin())
          .send({ ...base, password: 'short' })
          .expect(400)
      ).body.field,
    ).toBe('password');
    expect(
      (
        await request(t.app)
          .post('/api/users')
          .set(admin())
          .send({ ...base, role: 'boss' })
          .expect(400)
      ).body.field,
    ).toBe('role');
    expect(
      (
        await request(t.app)
          .post('/api/users')
          .set(admin())
          .send({ ...base, email: 'not-an-email' })
          .expect(400)
      ).body.field,
    ).toBe('email');
    await request(t.app).post('/api/users').set(admin()).send(base).expect(201);
    expect(
      (
        await request(t.app)
          .post('/api/users')
          .set(admin())
          .send({ ...base, email: 'SomeOne@example.test' })
          .expect(409)
      ).body.field,
    ).toBe('email');
  });

  it('an admin cannot disable themselves', async () => {
    const res = await request(t.app).delete(`/api/users/${t.userIds.admin}`).set(admin()).expect(409);
    expect(res.body.field).toBe('disabled');
  });

  it('readings query checks channel, points, from/to', async () => {
    const e = (await request(t.app).post('/api/engines').set(admin()).send(goodEngine()).expect(201)).body.id;
    const q = (s: string) => request(t.app).get(`/api/engines/${e}/readings?${s}`).set(admin());
    expect((await q('channel=oil_temp').expect(400)).body.field).toBe('channel');
    expect((await q('points=10').expect(400)).body.field).toBe('channel');
    expect((await q('channel=coolant_temp&points=0').expect(400)).body.field).toBe('points');
    expect((await q('channel=coolant_temp&points=2001').expect(400)).body.field).toBe('points');
    expect((await q('channel=coolant_temp&from=yesterday').expect(400)).body.field).toBe('from');
    expect((await q('channel=coolant_temp&from=2000&to=1000').expect(400)).body.field).toBe('from');
    await q('channel=coolant_temp&points=2000').expect(200);
  });

  it('a malformed JSON body is a 400 JSON error', async () => {
    const res = await request(t.app).post('/api/sites').set(admin()).set('Content-Type', 'application/json').send('{"name":').expect(400);
    expect(res.body.error).toMatch(/JSON/);
  });

  it('a bad id in the path names the field', async () => {
    expect((await request(t.app).get('/api/engines/abc').set(admin()).expect(400)).body.field).toBe('id');
  });
});

describe('not found is JSON', () => {
  it('unknown /api route, signed in or not', async () => {
    const a = await request(t.app).get('/api/nothing-here').expect(404);
    expect(a.body.error).toMatch(/no such API route/);
    await request(t.app).post('/api/sites/1/explode').set(admin()).expect(404);
  });

  it('unknown engine, site, device, user', async () => {
    for (const [m, p] of [
      ['get', '/api/engines/9999'],
      ['patch', '/api/sites/9999'],
      ['post', '/api/devices/9999/rotate'],
      ['patch', '/api/users/9999'],
    ] as const) {
      const res = await request(t.app)[m](p).set(admin()).send({});
      expect([res.status, typeof res.body.error]).toEqual([404, 'string']);
    }
  });
});

describe('devices', () => {
  it('shows the secret once on create and rotate, stores only a hash, and revokes', async () => {
    const engine = (await request(t.app).post('/api/engines').set(admin()).send(goodEngine()).expect(201)).body;
    const created = (await request(t.app).post('/api/devices').set(admin()).send({ engineId: engine.id }).expect(201)).body;
    expect(created.secret.length).toBeGreaterThanOrEqual(24);
    expect(created.secretHash).toBeUndefined();
    const list = (await request(t.app).get('/api/devices').set(admin()).expect(200)).body;
    expect(JSON.stringify(list)).not.toContain(created.secret);
    const { authenticateDevice } = await import('../../server/services/devices');
    expect(await authenticateDevice(t.ctx.models, created.username, created.secret)).toEqual({ deviceId: created.id, engineId: engine.id });
    const rotated = (await request(t.app).post(`/api/devices/${created.id}/rotate`).set(admin()).expect(200)).body;
    expect(rotated.secret).not.toBe(created.secret);
    expect(await authenticateDevice(t.ctx.models, created.username, created.secret)).toBeNull();
    expect(await authenticateDevice(t.ctx.models, created.username, rotated.secret)).not.toBeNull();
    const revoked = (await request(t.app).post(`/api/devices/${created.id}/revoke`).set(admin()).expect(200)).body;
    expect(revoked.revokedAt).toBeTruthy();
    expect(await authenticateDevice(t.ctx.models, created.username, rotated.secret)).toBeNull();
  });
});

describe('live fields and health', () => {
  it('GET /api/engines carries latest, lastSeenAt and runState from the live state', async () => {
    const { fixedLiveState } = await import('./helpers');
    const engine = (await request(t.app).post('/api/engines').set(admin()).send(goodEngine()).expect(201)).body;
    const before = t.ctx.telemetry!;
    t.ctx.telemetry = { ...before, liveState: fixedLiveState(engine.id, 1_767_000_000_000) };
    const list = (await request(t.app).get('/api/engines').set(auth(t.tokens.operator)).expect(200)).body as Array<Record<string, unknown>>;
    t.ctx.telemetry = before;
    const mine = list.find((e) => e.id === engine.id)!;
    expect(mine).toMatchObject({
      latest: { coolant_temp: { value: 41.5, ts: 1_767_000_000_000, quality: 0 } },
      lastSeenAt: 1_767_000_000_000,
      runState: 'stopped',
    });
    expect(list.filter((e) => e.id !== engine.id).every((e) => e.runState === 'no-data')).toBe(true);
  });

  it('health summarises counters without auth; admin ingest lists per-device rejections', async () => {
    const h = (await request(t.app).get('/api/health').expect(200)).body;
    expect(h).toMatchObject({ status: 'ok', version: expect.any(String), ingest: { received: 12, stored: 10, rejected: 2 } });
    const engine = (await request(t.app).post('/api/engines').set(admin()).send(goodEngine()).expect(201)).body;
    const dev = (await request(t.app).post('/api/devices').set(admin()).send({ engineId: engine.id }).expect(201)).body;
    await t.ctx.models.DeviceRejection.create({ deviceId: dev.id, reason: 'not_json', count: 3, lastAt: new Date(), lastDetail: 'Unexpected token' });
    const r = (await request(t.app).get('/api/admin/ingest').set(admin()).expect(200)).body;
    expect(r.counters.rejected).toEqual({ schema: 2 });
    expect(r.rejections).toContainEqual(
      expect.objectContaining({ deviceId: dev.id, username: dev.username, engineId: engine.id, reason: 'not_json', count: 3 }),
    );
  });
});
