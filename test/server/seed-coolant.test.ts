/**
 * Demo coolant data: the additive profile lets the initial-charge calculator work without typing a strength,
 * the due list shows a mix (not everything overdue), and every demo engine has past tests for its charts.
 * Demo figures are invented; this checks the seed's shape, not the trade (the computations have their own tests).
 */
import request from 'supertest';
import { DEMO_ADDITIVE_PROFILE } from '../../seeds/coolant-demo';
import { DEMO_PASSWORD } from '../../seeds/demo-scenario';
import { seedDemo } from '../../seeds/seed';
import { computeDueList } from '../../server/services/coolant/service-plan';
import { LITRES_PER_US_GALLON } from '../../shared/units';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let token: string;
beforeAll(async () => {
  t = await makeTestApp({ signIn: false });
  await t.ctx.models.User.destroy({ where: {} }); // seedDemo only runs on an empty DATA_DIR
  await seedDemo(t.ctx.sequelize, t.ctx.models, t.ctx.config, { bcryptCost: 4 });
  token = (await request(t.app).post('/api/auth/login').send({ email: 'tech@jacketwatch.test', password: DEMO_PASSWORD }).expect(200)).body.token;
});
afterAll(() => t.close());

const filterStates = async () => {
  const list = await computeDueList(t.ctx.models, { windowDays: 14, includeOk: true, now: Date.now() });
  const entries = list.sites.flatMap((s) => s.entries);
  return Object.fromEntries(entries.filter((e) => e.taskKey === 'filter-change').map((e) => [e.engineName, e.state]));
};

describe('demo coolant seed', () => {
  it('sets an additive profile marked as demo data, without brand names', async () => {
    const res = await request(t.app).get('/api/additive-profile').set(auth(token)).expect(200);
    expect(res.body.configured).toBe(true);
    expect(res.body.name).toMatch(/demo/i);
    expect(res.body.liquidUnitsPerLitre).toBe(DEMO_ADDITIVE_PROFILE.liquidUnitsPerLitre);
    expect(res.body.filterSizes.length).toBeGreaterThanOrEqual(2);
    for (const f of res.body.filterSizes) expect(f.label).toMatch(/^Demo /);
  });

  it('the initial-charge calculator works without a typed strength', async () => {
    const res = await request(t.app).post('/api/calc/initial-charge').set(auth(token)).send({ capacityL: 180, filterPrechargeUnits: 15 }).expect(200);
    expect(res.body.liquidUnitsPerLitre).toBe(2.1);
    // 1.2 units/US gal in 180 L less the filter's 15 units, at 2.1 units/L, rounded up to 0.05 L
    const litres = (1.2 * (180 / LITRES_PER_US_GALLON) - 15) / 2.1;
    expect(res.body.liquidL).toBeCloseTo(Math.ceil(litres / 0.05) * 0.05, 5);
  });

  it('the due list shows a mix: filter change ok, due soon and overdue on different engines', async () => {
    expect(await filterStates()).toEqual({
      'Works gen-set A': 'due-soon', // 10 h before its 250 h interval
      'Works gen-set B': 'ok',
      'Fire-pump engine': 'overdue', // yearly date passed
      'Ridgeback gen-set 1': 'ok',
      'Ridgeback gen-set 2': 'due-soon', // yearly date in 10 days
      'Booster pump engine': 'overdue', // 20 h past its 500 h interval
      'Intake gen-set north': 'ok',
      'Intake gen-set south': 'ok',
    });
    const list = await computeDueList(t.ctx.models, { windowDays: 14, now: Date.now() });
    const total = list.sites.reduce((n, s) => n + s.overdue, 0);
    const engines = await t.ctx.models.Engine.count();
    expect(total).toBeLessThan((engines * 6) / 2); // not everything overdue
  });

  it('every demo engine has past tests; extended-life ones carry no strip decision', async () => {
    for (const e of await t.ctx.models.Engine.findAll()) {
      const res = await request(t.app).get(`/api/engines/${e.id}/coolant-tests`).set(auth(token)).expect(200);
      expect(res.body.length).toBeGreaterThanOrEqual(3);
      for (const test of res.body) {
        expect(new Date(test.testedAt).getTime()).toBeLessThan(Date.now());
        if (e.coolantFamily === 'extended-life') expect(test.decision.additive.status).toBe('not-applicable');
        else expect(['low', 'in-range', 'high']).toContain(test.decision.additive.status);
      }
    }
  });
});
