/**
 * Demo work: two technicians with assigned work, some of it under way (with a draft on its next step), an
 * overdue due item, a request for the planner, and no alarms from the seed. Shapes of the invented demo, not trade figures.
 */
import request from 'supertest';
import { DEMO_PASSWORD } from '../../seeds/demo-scenario';
import { seedDemo } from '../../seeds/seed';
import { DEMO_WORK_ORDERS } from '../../seeds/work-demo';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
const login = async (email: string) => (await request(t.app).post('/api/auth/login').send({ email, password: DEMO_PASSWORD }).expect(200)).body.token as string;

beforeAll(async () => {
  t = await makeTestApp({ signIn: false });
  await t.ctx.models.User.destroy({ where: {} }); // seedDemo only runs on an empty DATA_DIR
  await seedDemo(t.ctx.sequelize, t.ctx.models, t.ctx.config, { bcryptCost: 4 });
});
afterAll(() => t.close());

interface Summary {
  id: number;
  status: string;
  assigneeId: number | null;
  dueDate: string | null;
  stepsDone: number;
  stepsTotal: number;
}

describe('demo work seed', () => {
  it('gives each of two technicians assigned work, some of it in progress', async () => {
    for (const email of ['tech@jacketwatch.test', 'tech2@jacketwatch.test']) {
      const token = await login(email);
      const mine: Summary[] = (await request(t.app).get('/api/work-orders?mine=1').set(auth(token)).expect(200)).body;
      expect(mine.length).toBeGreaterThanOrEqual(2);
      expect(mine.some((o) => o.status === 'in-progress' && o.stepsDone >= 1 && o.stepsDone < o.stepsTotal)).toBe(true);
      expect(mine.some((o) => o.status === 'planned' && o.dueDate !== null)).toBe(true);
    }
    expect(await t.ctx.models.User.count({ where: { role: 'technician' } })).toBe(2);
  });

  it('an in-progress order carries a draft value on its next step, and its history says who started it', async () => {
    const token = await login('tech@jacketwatch.test');
    const mine: Summary[] = (await request(t.app).get('/api/work-orders?mine=1').set(auth(token)).expect(200)).body;
    const going = mine.find((o) => o.status === 'in-progress')!;
    const detail = (await request(t.app).get(`/api/work-orders/${going.id}`).set(auth(token)).expect(200)).body;
    const draft = detail.steps.find((s: { resultValue: number | null; doneAt: string | null }) => s.resultValue !== null && !s.doneAt);
    expect(draft).toBeDefined();
    expect(JSON.stringify(detail.events ?? detail.history ?? [])).toMatch(/started/);
  });

  it('the planner sees a request to accept, and the due list has an overdue task', async () => {
    const token = await login('planner@jacketwatch.test');
    const requested: Summary[] = (await request(t.app).get('/api/work-orders?status=requested').set(auth(token)).expect(200)).body;
    expect(requested).toHaveLength(DEMO_WORK_ORDERS.filter((w) => w.status === 'requested').length);
    const due = (await request(t.app).get('/api/due-list').set(auth(token)).expect(200)).body;
    const entries = due.sites.flatMap((s: { entries: { state: string }[] }) => s.entries);
    expect(entries.some((e: { state: string }) => e.state === 'overdue')).toBe(true);
  });

  it('seeding raises no alarm', async () => {
    expect(await t.ctx.models.Alarm.count()).toBe(0);
  });
});
