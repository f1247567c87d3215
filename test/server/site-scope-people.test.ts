/**
 * The on-call rota and the people pickers follow the asker's sites: a user limited to site A sees
 * A's shifts only, no names of people who work only at site B, and cannot plan B's rota.
 */
import path from 'node:path';
import type { Express } from 'express';
import request from 'supertest';
import { createApp } from '../../server/app';
import { alarmRouters } from '../../server/routes';
import { createAlarmFeature } from '../../server/services/alarms';
import { auth, makeTestApp, PASSWORD, type TestApp } from './helpers';

let t: TestApp;
let app: Express;
const ids = { siteA: 0, siteB: 0, shiftA: 0, shiftB: 0, plannerA: 0, techB: 0 };
let plannerA = '';

beforeAll(async () => {
  t = await makeTestApp();
  app = createApp(t.ctx, { staticDir: path.join(t.dataDir, 'no-app'), extraRouters: (doc) => alarmRouters(t.ctx, createAlarmFeature(t.ctx), doc) });
  ids.siteA = (await t.ctx.models.Site.create({ name: 'Alpha works', timeZone: 'UTC' })).id;
  ids.siteB = (await t.ctx.models.Site.create({ name: 'Bravo works', timeZone: 'UTC' })).id;
  const admin = auth(t.tokens.admin);
  const limitedUser = async (email: string, role: string, siteId: number) => {
    const u = (
      await request(app)
        .post('/api/users')
        .set(admin)
        .send({ email, name: email.split('@')[0], password: PASSWORD, role })
        .expect(201)
    ).body;
    await request(app)
      .put(`/api/users/${u.id}/sites`)
      .set(admin)
      .send({ siteIds: [siteId] })
      .expect(200);
    return u.id as number;
  };
  ids.plannerA = await limitedUser('planner.a@example.test', 'planner', ids.siteA);
  ids.techB = await limitedUser('tech.b@example.test', 'technician', ids.siteB);
  plannerA = (await request(app).post('/api/auth/login').send({ email: 'planner.a@example.test', password: PASSWORD }).expect(200)).body.token;
  const now = Date.now();
  const shift = async (siteId: number, userId: number) =>
    (
      await request(app)
        .post('/api/oncall')
        .set(admin)
        .send({ siteId, userId, startsAt: now - 3600_000, endsAt: now + 3600_000 })
        .expect(201)
    ).body.id as number;
  ids.shiftA = await shift(ids.siteA, t.userIds.technician);
  ids.shiftB = await shift(ids.siteB, ids.techB);
});
afterAll(() => t.close());

describe('a planner limited to site A', () => {
  it('reads only site A shifts (and nothing when asking for site B)', async () => {
    const all = (await request(app).get('/api/oncall').set(auth(plannerA)).expect(200)).body;
    expect(all.map((s: { id: number }) => s.id)).toEqual([ids.shiftA]);
    expect((await request(app).get(`/api/oncall?siteId=${ids.siteB}`).set(auth(plannerA)).expect(200)).body).toEqual([]);
    // an all-sites admin still sees both
    expect((await request(app).get('/api/oncall').set(auth(t.tokens.admin)).expect(200)).body).toHaveLength(2);
  });

  it('gets no people who work only at site B in the pickers', async () => {
    const people = (await request(app).get('/api/people').set(auth(plannerA)).expect(200)).body.map((p: { id: number }) => p.id);
    expect(people).toContain(t.userIds.technician); // no site rows: works everywhere
    expect(people).toContain(ids.plannerA);
    expect(people).not.toContain(ids.techB);
    const assignees = (await request(app).get('/api/work-orders/assignees').set(auth(plannerA)).expect(200)).body.map((p: { id: number }) => p.id);
    expect(assignees).toContain(t.userIds.technician);
    expect(assignees).not.toContain(ids.techB);
    const all = (await request(app).get('/api/people').set(auth(t.tokens.admin)).expect(200)).body.map((p: { id: number }) => p.id);
    expect(all).toContain(ids.techB);
  });

  it("cannot plan or change site B's rota: B's shift reads as unknown", async () => {
    const now = Date.now();
    const res = await request(app)
      .post('/api/oncall')
      .set(auth(plannerA))
      .send({ siteId: ids.siteB, userId: t.userIds.technician, startsAt: now, endsAt: now + 3600_000 })
      .expect(400);
    expect(res.body.field).toBe('siteId');
    await request(app).patch(`/api/oncall/${ids.shiftB}`).set(auth(plannerA)).send({ backupUserId: null }).expect(404);
    await request(app).delete(`/api/oncall/${ids.shiftB}`).set(auth(plannerA)).expect(404);
    await request(app).patch(`/api/oncall/${ids.shiftA}`).set(auth(plannerA)).send({ backupUserId: null }).expect(200);
  });
});
