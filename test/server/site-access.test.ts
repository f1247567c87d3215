/**
 * Site access on a real SQLite file: users limited to sites (user_sites) list only their sites'
 * engines, alarms, work orders and due-list items; anything of another site reads as not found
 * (404, so its ids do not leak); writes on another site's engine are refused; admins and users
 * without rows see every site. The live-push watch is checked on a real socket.io server.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Express } from 'express';
import { io as ioClient, type Socket } from 'socket.io-client';
import request from 'supertest';
import { until } from './support/until';
import path from 'node:path';
import { createApp } from '../../server/app';
import { alarmRouters } from '../../server/routes';
import { createLogger } from '../../server/logger';
import { LivePush } from '../../server/realtime/live-push';
import { createAlarmFeature } from '../../server/services/alarms';
import { siteScopeForUser } from '../../server/services/site-access';
import type { AuthUser } from '../../server/telemetry/types';
import { auth, makeTestApp, PASSWORD, type TestApp } from './helpers';

let t: TestApp;
let app: Express;
const ids = { siteA: 0, siteB: 0, engineA: 0, engineB: 0, alarmA: 0, alarmB: 0, orderA: 0, orderB: 0, attachmentB: 0 };
const tokens = { operatorA: '', techA: '', plannerA: '' };
let operatorAId = 0;
let techAId = 0;

const JPEG = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10]), Buffer.from('JFIF\0'), Buffer.alloc(200, 1), Buffer.from([0xff, 0xd9])]);

async function signIn(email: string): Promise<string> {
  return (await request(app).post('/api/auth/login').send({ email, password: PASSWORD }).expect(200)).body.token;
}

beforeAll(async () => {
  t = await makeTestApp();
  t.ctx.telemetry = {
    ...t.ctx.telemetry!,
    onReadings: () => undefined,
    emit: () => undefined,
  } as unknown as typeof t.ctx.telemetry;
  // the core routers plus the alarm routers, over the same context and database
  app = createApp(t.ctx, { staticDir: path.join(t.dataDir, 'no-app'), extraRouters: (doc) => alarmRouters(t.ctx, createAlarmFeature(t.ctx), doc) });
  const { Site, Engine, Alarm } = t.ctx.models;
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
    runHours: 100,
  });
  ids.siteA = (await Site.create({ name: 'Alpha works', timeZone: 'UTC' })).id;
  ids.siteB = (await Site.create({ name: 'Bravo works', timeZone: 'UTC' })).id;
  ids.engineA = (await Engine.create(row(ids.siteA, 'Alpha set 1'))).id;
  ids.engineB = (await Engine.create(row(ids.siteB, 'Bravo set 1'))).id;
  const alarm = (engineId: number) =>
    Alarm.create({
      engineId,
      rule: 'coolant_temp_high',
      priority: 'high',
      state: 'unacknowledged',
      raisedAt: new Date(),
      value: 104,
      worstValue: 104,
      unit: 'degC',
      message: 'Coolant temperature high',
    });
  ids.alarmA = (await alarm(ids.engineA)).id;
  ids.alarmB = (await alarm(ids.engineB)).id;

  const planner = auth(t.tokens.planner);
  const order = async (engineId: number) =>
    (await request(app).post('/api/work-orders').set(planner).send({ engineId, kind: 'leak-check', assigneeId: t.userIds.technician }).expect(201)).body
      .id as number;
  ids.orderA = await order(ids.engineA);
  ids.orderB = await order(ids.engineB);
  await request(app).post(`/api/work-orders/${ids.orderB}/transition`).set(auth(t.tokens.technician)).send({ to: 'in-progress' }).expect(200);
  ids.attachmentB = (
    await request(app)
      .post(`/api/work-orders/${ids.orderB}/attachments`)
      .set(auth(t.tokens.technician))
      .attach('file', JPEG, { filename: 'b.jpg', contentType: 'image/jpeg' })
      .expect(201)
  ).body.id;
  await request(app).post(`/api/engines/${ids.engineB}/coolant-tests`).set(auth(t.tokens.technician)).send({ method: 'strip', scaUnitsPerGal: 2 }).expect(201);

  // users limited to site A, set through the admin API
  const admin = auth(t.tokens.admin);
  for (const [key, role] of [
    ['operatorA', 'operator'],
    ['techA', 'technician'],
    ['plannerA', 'planner'],
  ] as const) {
    const email = `${key.toLowerCase()}@example.test`;
    const u = (await request(app).post('/api/users').set(admin).send({ email, name: key, password: PASSWORD, role }).expect(201)).body;
    expect(u.siteIds).toEqual([]);
    const res = await request(app)
      .put(`/api/users/${u.id}/sites`)
      .set(admin)
      .send({ siteIds: [ids.siteA] })
      .expect(200);
    expect(res.body).toMatchObject({ id: u.id, siteIds: [ids.siteA] });
    expect(res.body.passwordHash).toBeUndefined();
    tokens[key] = await signIn(email);
    if (key === 'operatorA') operatorAId = u.id;
    if (key === 'techA') techAId = u.id;
  }
});
afterAll(() => t.close());

const get = (token: string, url: string) => request(app).get(url).set(auth(token));

describe('a user limited to one site', () => {
  it('lists only that site, its engines, alarms and work orders', async () => {
    const op = tokens.operatorA;
    expect((await get(op, '/api/sites').expect(200)).body.map((s: { id: number }) => s.id)).toEqual([ids.siteA]);
    expect((await get(op, '/api/engines').expect(200)).body.map((e: { id: number }) => e.id)).toEqual([ids.engineA]);
    expect((await get(op, `/api/engines?siteId=${ids.siteB}`).expect(200)).body).toEqual([]);
    expect((await get(op, '/api/alarms?state=all').expect(200)).body.map((a: { id: number }) => a.id)).toEqual([ids.alarmA]);
    expect((await get(op, `/api/alarms?state=all&engineId=${ids.engineB}`).expect(200)).body).toEqual([]);
    expect((await get(op, '/api/alarms/summary').expect(200)).body.open).toBe(1);
    expect((await get(op, '/api/work-orders').expect(200)).body.map((w: { id: number }) => w.id)).toEqual([ids.orderA]);
    expect((await get(op, `/api/work-orders?siteId=${ids.siteB}`).expect(200)).body).toEqual([]);
    expect((await get(op, `/api/work-orders?engineId=${ids.engineB}`).expect(200)).body).toEqual([]);
    const due = (await get(op, '/api/due-list?include=all').expect(200)).body;
    expect(due.sites.map((s: { siteId: number }) => s.siteId)).toEqual([ids.siteA]);
    expect((await get(op, `/api/due-list?include=all&siteId=${ids.siteB}`).expect(200)).body.sites).toEqual([]);
  });

  it("gets 404 for another site's engine, readings, opening check, work order, attachment, alarm and coolant tests", async () => {
    const op = tokens.operatorA;
    const hidden = [
      `/api/engines/${ids.engineB}`,
      `/api/engines/${ids.engineB}/readings?channel=coolant_temp`,
      `/api/engines/${ids.engineB}/opening-check`,
      `/api/engines/${ids.engineB}/coolant-tests`,
      `/api/engines/${ids.engineB}/service-plan`,
      `/api/engines/${ids.engineB}/run-hours`,
      `/api/work-orders/${ids.orderB}`,
      `/api/attachments/${ids.attachmentB}`,
      `/api/alarms/${ids.alarmB}`,
    ];
    for (const url of hidden) {
      const res = await get(op, url);
      expect([url, res.status]).toEqual([url, 404]);
      expect(res.body.error).toMatch(/not found/);
    }
    // the same user reaches its own site's objects
    for (const url of [
      `/api/engines/${ids.engineA}`,
      `/api/engines/${ids.engineA}/opening-check`,
      `/api/work-orders/${ids.orderA}`,
      `/api/alarms/${ids.alarmA}`,
    ]) {
      expect([url, (await get(op, url)).status]).toEqual([url, 200]);
    }
    // a hidden id answers exactly as one that does not exist
    const unknown = await get(op, '/api/engines/999999');
    const other = await get(op, `/api/engines/${ids.engineB}`);
    expect({ status: other.status, body: other.body }).toEqual({ status: unknown.status, body: unknown.body });
  });

  it("cannot act on another site's alarm or work order", async () => {
    await request(app).post(`/api/alarms/${ids.alarmB}/acknowledge`).set(auth(tokens.operatorA)).send({}).expect(404);
    await request(app).post(`/api/alarms/${ids.alarmB}/notes`).set(auth(tokens.operatorA)).send({ note: 'looked' }).expect(404);
    await request(app).post(`/api/work-orders/${ids.orderB}/transition`).set(auth(tokens.techA)).send({ to: 'waiting-sign-off' }).expect(404);
    await request(app).post(`/api/work-orders/${ids.orderB}/amendments`).set(auth(tokens.techA)).send({ text: 'x' }).expect(404);
    await request(app).patch(`/api/work-orders/${ids.orderB}`).set(auth(tokens.plannerA)).send({ title: 'renamed' }).expect(404);
    await request(app)
      .post(`/api/work-orders/${ids.orderB}/attachments`)
      .set(auth(tokens.techA))
      .attach('file', JPEG, { filename: 'x.jpg', contentType: 'image/jpeg' })
      .expect(404);
    expect(await t.ctx.models.Attachment.count({ where: { workOrderId: ids.orderB } })).toBe(1);
    const alarmB = await t.ctx.models.Alarm.findByPk(ids.alarmB);
    expect(alarmB!.state).toBe('unacknowledged');
  });

  it("cannot create a work order or a coolant test on another site's engine, but can on its own", async () => {
    const tech = auth(tokens.techA);
    const wo = await request(app).post('/api/work-orders').set(tech).send({ engineId: ids.engineB, kind: 'leak-check' }).expect(400);
    const unknown = await request(app).post('/api/work-orders').set(tech).send({ engineId: 999999, kind: 'leak-check' }).expect(400);
    expect(wo.body).toEqual(unknown.body);
    await request(app).post(`/api/engines/${ids.engineB}/coolant-tests`).set(tech).send({ method: 'strip', scaUnitsPerGal: 2 }).expect(404);
    expect(await t.ctx.models.CoolantTest.count({ where: { engineId: ids.engineB } })).toBe(1);
    expect(await t.ctx.models.WorkOrder.count({ where: { engineId: ids.engineB } })).toBe(1);
    await request(app).post('/api/work-orders').set(tech).send({ engineId: ids.engineA, kind: 'leak-check' }).expect(201);
    await request(app).post(`/api/engines/${ids.engineA}/coolant-tests`).set(tech).send({ method: 'strip', scaUnitsPerGal: 2 }).expect(201);
  });

  it("lab CSV rows of another site's engine are refused as unknown engines; its own are stored", async () => {
    const csv = `engine_id,tested_at,method,sca_units_per_gal\n${ids.engineA},2026-01-05T10:00:00Z,lab,2.1\n${ids.engineB},2026-01-05T10:00:00Z,lab,2.2\n`;
    const res = await request(app)
      .post('/api/coolant-tests/import')
      .set(auth(tokens.techA))
      .attach('file', Buffer.from(csv), { filename: 'lab.csv', contentType: 'text/csv' });
    expect(res.body.accepted.map((a: { engineId: number }) => a.engineId)).toEqual([ids.engineA]);
    expect(res.body.rejected).toEqual([expect.objectContaining({ line: 3, field: 'engine_id', error: `engine_id: no active engine ${ids.engineB}` })]);
  });
});

describe('who sees every site', () => {
  it('an admin sees every site even with user_sites rows', async () => {
    await request(app)
      .put(`/api/users/${t.userIds.admin}/sites`)
      .set(auth(t.tokens.admin))
      .send({ siteIds: [ids.siteA] })
      .expect(200);
    const admin = t.tokens.admin;
    expect((await get(admin, '/api/engines').expect(200)).body.map((e: { id: number }) => e.id)).toEqual(expect.arrayContaining([ids.engineA, ids.engineB]));
    await get(admin, `/api/engines/${ids.engineB}`).expect(200);
    await get(admin, `/api/work-orders/${ids.orderB}`).expect(200);
    await get(admin, `/api/attachments/${ids.attachmentB}`).expect(200);
    expect((await get(admin, '/api/alarms?state=all').expect(200)).body.map((a: { id: number }) => a.id).sort()).toEqual([ids.alarmA, ids.alarmB].sort());
    await request(app).put(`/api/users/${t.userIds.admin}/sites`).set(auth(admin)).send({ siteIds: [] }).expect(200);
  });

  it('a user without rows sees every site; an empty list gives a limited user every site again', async () => {
    expect((await get(t.tokens.operator, '/api/sites').expect(200)).body).toHaveLength(2);
    await get(t.tokens.operator, `/api/work-orders/${ids.orderB}`).expect(200);
    await request(app).put(`/api/users/${operatorAId}/sites`).set(auth(t.tokens.admin)).send({ siteIds: [] }).expect(200);
    await get(tokens.operatorA, `/api/engines/${ids.engineB}`).expect(200);
    await request(app)
      .put(`/api/users/${operatorAId}/sites`)
      .set(auth(t.tokens.admin))
      .send({ siteIds: [ids.siteA] })
      .expect(200);
    await get(tokens.operatorA, `/api/engines/${ids.engineB}`).expect(404);
  });
});

describe('PUT /api/users/:id/sites', () => {
  it('is for admins only, checks the sites exist, and shows siteIds in the user list', async () => {
    await request(app)
      .put(`/api/users/${techAId}/sites`)
      .set(auth(t.tokens.planner))
      .send({ siteIds: [ids.siteB] })
      .expect(403);
    const bad = await request(app)
      .put(`/api/users/${techAId}/sites`)
      .set(auth(t.tokens.admin))
      .send({ siteIds: [999999] })
      .expect(400);
    expect(bad.body.field).toBe('siteIds');
    await request(app)
      .put(`/api/users/${techAId}/sites`)
      .set(auth(t.tokens.admin))
      .send({ siteIds: ['x'] })
      .expect(400);
    await request(app).put('/api/users/999999/sites').set(auth(t.tokens.admin)).send({ siteIds: [] }).expect(404);
    const users = (await get(t.tokens.admin, '/api/users').expect(200)).body as Array<{ id: number; siteIds: number[] }>;
    expect(users.find((u) => u.id === techAId)!.siteIds).toEqual([ids.siteA]);
    expect(users.find((u) => u.id === t.userIds.planner)!.siteIds).toEqual([]);
  });

  it('is described in the OpenAPI document, with siteIds in the user schema', async () => {
    const doc = (await request(app).get('/api/openapi.json').expect(200)).body;
    expect(doc.paths['/api/users/{id}/sites']?.put).toBeDefined();
    expect(JSON.stringify(doc.components.schemas.User)).toContain('siteIds');
  });
});

describe('live push watch', () => {
  let server: http.Server;
  let push: LivePush;
  const sockets: Socket[] = [];
  const users = new Map<string, AuthUser>();

  beforeAll(async () => {
    server = http.createServer();
    users.set('limited', { id: operatorAId, email: 'operatora@example.test', role: 'operator' });
    users.set('everyone', { id: t.userIds.operator, email: 'operator@example.test', role: 'operator' });
    const siteOf = new Map([
      [ids.engineA, ids.siteA],
      [ids.engineB, ids.siteB],
    ]);
    push = new LivePush({
      httpServer: server,
      verifyToken: (token) => users.get(token) ?? null,
      siteOfEngine: async (id) => siteOf.get(id) ?? null,
      siteScope: (u) => siteScopeForUser(t.ctx.models, u),
      log: createLogger('error'),
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  });
  afterAll(async () => {
    for (const s of sockets) s.disconnect();
    await push.close();
    await new Promise<void>((resolve) => server.close(() => resolve()));
  });

  const connect = async (token: string) => {
    const s = ioClient(`http://127.0.0.1:${(server.address() as AddressInfo).port}`, { auth: { token }, transports: ['websocket'], reconnection: false });
    sockets.push(s);
    await new Promise<void>((resolve, reject) => {
      s.once('connect', () => resolve());
      s.once('connect_error', reject);
    });
    return s;
  };
  const watchAll = () => ({ fleet: true, alarms: true, siteIds: [ids.siteA, ids.siteB], engineIds: [ids.engineA, ids.engineB] });

  it('a limited user joins only its own rooms: fleet becomes its sites, other sites and engines are left out', async () => {
    const s = await connect('limited');
    const ack = await s.timeout(5000).emitWithAck('watch', watchAll());
    expect(ack.error).toBeUndefined();
    expect(ack.rooms.sort()).toEqual([`alarms:site:${ids.siteA}`, `engine:${ids.engineA}`, `site:${ids.siteA}`].sort());
    const got: Array<{ engineId: number }> = [];
    s.on('readings', (m) => got.push(m));
    // its sites' engines come in the batches of the fleet interval
    s.on('readings-batch', (b: { engines: Array<{ engineId: number }> }) => got.push(...b.engines));
    push.push([
      { engineId: ids.engineB, channel: 'coolant_temp', ts: Date.now(), value: 80, quality: 0 },
      { engineId: ids.engineA, channel: 'coolant_temp', ts: Date.now(), value: 81, quality: 0 },
    ]);
    // B and A go out in the same push: once A is here, a leak of B would be too
    await until(
      'engine A pushed',
      async () => got.length,
      (n) => n > 0,
      10_000,
      20,
    );
    expect(got.map((m) => m.engineId)).toEqual([ids.engineA]);
  });

  it('a user without rows joins every room asked for', async () => {
    const s = await connect('everyone');
    const ack = await s.timeout(5000).emitWithAck('watch', watchAll());
    expect(ack.error).toBeUndefined();
    expect(ack.rooms.sort()).toEqual(['alarms', 'fleet', `site:${ids.siteA}`, `site:${ids.siteB}`, `engine:${ids.engineA}`, `engine:${ids.engineB}`].sort());
  });
});
