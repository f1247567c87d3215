import request from 'supertest';
import { createDevice } from '../../server/services/devices';
import { auth, makeTestApp, ROLE_LIST, type TestApp } from './helpers';

let t: TestApp;
let siteId: number;
let engineId: number;
let deviceId: number;
// throwaway rows the admin case retires, revokes or disables
let spare: { site: number; engine: number; device: number; user: number };

beforeAll(async () => {
  t = await makeTestApp();
  const { Site, Engine, User } = t.ctx.models;
  const engineRow = (sid: number, name: string) => ({
    siteId: sid,
    name,
    duty: 'standby' as const,
    capacityL: 60,
    coolantFamily: 'conventional' as const,
    glycolType: 'ethylene' as const,
    glycolPercent: 50,
    capPressureKpa: 100,
    oilDrainIntervalH: 250,
  });
  siteId = (await Site.create({ name: 'Test site', timeZone: 'Europe/Lisbon' })).id;
  engineId = (await Engine.create(engineRow(siteId, 'Test engine'))).id;
  deviceId = (await createDevice(t.ctx.models, { engineId }, 4)).device.id;
  const site = (await Site.create({ name: 'Spare site', timeZone: 'UTC' })).id;
  const engine = (await Engine.create(engineRow(siteId, 'Spare engine'))).id;
  const device = (await createDevice(t.ctx.models, { engineId }, 4)).device.id;
  const user = (await User.create({ email: 'spare@example.test', name: 'Spare', role: 'operator', passwordHash: 'x' })).id;
  spare = { site, engine, device, user };
});
afterAll(() => t.close());

type Method = 'get' | 'post' | 'patch' | 'delete';
interface Case {
  method: Method;
  path: () => string;
  /** OpenAPI path template of the route. */
  doc: string;
  /** Who may call it: 'public', 'read' (every signed-in role) or 'admin'. */
  who: 'public' | 'read' | 'admin';
  ok: number;
  body?: () => object;
}

const cases: Case[] = [
  { method: 'get', path: () => '/api/health', doc: '/api/health', who: 'public', ok: 200 },
  { method: 'get', path: () => '/api/openapi.json', doc: '/api/openapi.json', who: 'public', ok: 200 },
  { method: 'get', path: () => '/api/auth/me', doc: '/api/auth/me', who: 'read', ok: 200 },
  { method: 'post', path: () => '/api/auth/logout', doc: '/api/auth/logout', who: 'public', ok: 200 },
  { method: 'get', path: () => '/api/sites', doc: '/api/sites', who: 'read', ok: 200 },
  { method: 'get', path: () => '/api/engines', doc: '/api/engines', who: 'read', ok: 200 },
  { method: 'get', path: () => `/api/engines/${engineId}`, doc: '/api/engines/{id}', who: 'read', ok: 200 },
  { method: 'get', path: () => `/api/engines/${engineId}/readings?channel=coolant_temp`, doc: '/api/engines/{id}/readings', who: 'read', ok: 200 },
  { method: 'post', path: () => '/api/sites', doc: '/api/sites', who: 'admin', ok: 201, body: () => ({ name: 'New site', timeZone: 'Asia/Kolkata' }) },
  { method: 'patch', path: () => `/api/sites/${siteId}`, doc: '/api/sites/{id}', who: 'admin', ok: 200, body: () => ({ name: 'Renamed site' }) },
  { method: 'delete', path: () => `/api/sites/${spare.site}`, doc: '/api/sites/{id}', who: 'admin', ok: 200 },
  { method: 'post', path: () => '/api/engines', doc: '/api/engines', who: 'admin', ok: 201, body: () => ({ siteId, name: 'New engine', capacityL: 120 }) },
  { method: 'patch', path: () => `/api/engines/${engineId}`, doc: '/api/engines/{id}', who: 'admin', ok: 200, body: () => ({ runHours: 1234 }) },
  { method: 'delete', path: () => `/api/engines/${spare.engine}`, doc: '/api/engines/{id}', who: 'admin', ok: 200 },
  { method: 'get', path: () => '/api/devices', doc: '/api/devices', who: 'admin', ok: 200 },
  { method: 'post', path: () => '/api/devices', doc: '/api/devices', who: 'admin', ok: 201, body: () => ({ engineId }) },
  { method: 'post', path: () => `/api/devices/${deviceId}/rotate`, doc: '/api/devices/{id}/rotate', who: 'admin', ok: 200 },
  { method: 'post', path: () => `/api/devices/${spare.device}/revoke`, doc: '/api/devices/{id}/revoke', who: 'admin', ok: 200 },
  { method: 'get', path: () => '/api/users', doc: '/api/users', who: 'admin', ok: 200 },
  {
    method: 'post',
    path: () => '/api/users',
    doc: '/api/users',
    who: 'admin',
    ok: 201,
    body: () => ({ email: 'new@example.test', name: 'New Person', password: 'long-enough-pw', role: 'technician' }),
  },
  { method: 'patch', path: () => `/api/users/${spare.user}`, doc: '/api/users/{id}', who: 'admin', ok: 200, body: () => ({ name: 'Renamed' }) },
  { method: 'delete', path: () => `/api/users/${spare.user}`, doc: '/api/users/{id}', who: 'admin', ok: 200 },
  { method: 'get', path: () => '/api/admin/ingest', doc: '/api/admin/ingest', who: 'admin', ok: 200 },
];

function expected(c: Case, role: string): number {
  if (c.who === 'public') return c.ok;
  if (role === 'anonymous') return 401;
  if (c.who === 'read' || role === 'admin') return c.ok;
  return 403;
}

// non-admins first, so the admin's writes (retire, revoke, disable) come last
const table = ['anonymous', 'operator', 'technician', 'planner', 'admin'].flatMap((role) =>
  cases.map((c) => [role, c.method.toUpperCase(), c.doc, c] as const),
);

describe('role x route', () => {
  it.each(table)('%s %s %s', async (role, _m, _doc, c) => {
    let req = request(t.app)[c.method](c.path());
    if (role !== 'anonymous') req = req.set(auth(t.tokens[role as (typeof ROLE_LIST)[number]]));
    const res = await (c.body ? req.send(c.body()) : req);
    expect({ status: res.status, json: /json/.test(res.headers['content-type'] ?? '') }).toEqual({ status: expected(c, role), json: true });
    if (res.status >= 400) expect(typeof res.body.error).toBe('string');
  });

  it('a forged or expired token is 401', async () => {
    await request(t.app)
      .get('/api/sites')
      .set(auth(t.tokens.admin + 'x'))
      .expect(401);
    const jwt = await import('jsonwebtoken');
    const old = jwt.sign({ email: 'admin@example.test', role: 'admin' }, 'some-other-secret', { subject: '1', issuer: 'jacketwatch' });
    await request(t.app).get('/api/sites').set(auth(old)).expect(401);
  });

  it('a disabled user loses access at once', async () => {
    const { User } = t.ctx.models;
    await User.update({ disabled: true }, { where: { id: t.userIds.operator } });
    await request(t.app).get('/api/sites').set(auth(t.tokens.operator)).expect(401);
    await User.update({ disabled: false }, { where: { id: t.userIds.operator } });
  });

  it('the OpenAPI document describes every route of the table', async () => {
    const doc = (await request(t.app).get('/api/openapi.json').expect(200)).body as { openapi: string; paths: Record<string, Record<string, unknown>> };
    expect(doc.openapi).toBe('3.1.0');
    for (const c of cases) expect(doc.paths[c.doc]?.[c.method]).toBeDefined();
  });
});
