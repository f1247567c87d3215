import fs from 'node:fs';
import request from 'supertest';
import { authenticateDevice } from '../../server/services/devices';
import { DEMO_PASSWORD } from '../../seeds/demo-scenario';
import { seedDemo, seedFleet } from '../../seeds/seed';
import { makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signIn: false });
  await t.ctx.models.User.destroy({ where: {} }); // seedDemo only runs on an empty DATA_DIR
});
afterAll(() => t.close());

describe('seeds', () => {
  it('creates the demo scenario once, with a devices file whose secrets authenticate', async () => {
    const { sequelize, models, config } = t.ctx;
    const r = await seedDemo(sequelize, models, config, { bcryptCost: 4 });
    expect(r.created).toBe(true);
    const sites = await models.Site.findAll();
    expect(new Set(sites.map((s) => s.timeZone)).size).toBe(3);
    // every demo site has an (invented) design low temperature, so the freeze-protection verdicts show in the demo
    for (const s of sites) expect(typeof s.designLowTempC).toBe('number');
    const engines = await models.Engine.findAll();
    expect(engines).toHaveLength(8);
    for (const e of engines) {
      expect(e.capacityL).toBeGreaterThanOrEqual(40);
      expect(e.capacityL).toBeLessThanOrEqual(400);
      expect(e.glycolPercent).toBeGreaterThanOrEqual(40);
      expect(e.glycolPercent).toBeLessThanOrEqual(50);
      if (e.heaterSetpointC !== null) expect(e.heaterSetpointC).toBeGreaterThanOrEqual(38);
    }
    expect(engines.filter((e) => e.duty === 'continuous')).toHaveLength(1);
    expect(engines.filter((e) => e.coolantFamily === 'extended-life')).toHaveLength(1);

    const file = JSON.parse(fs.readFileSync(r.devicesFile, 'utf8'));
    expect(file.devices).toHaveLength(8);
    const d = file.devices[0];
    expect(Object.keys(d).sort()).toEqual([
      'capPressureKpa',
      'capacityL',
      'coolantFamily',
      'duty',
      'engineId',
      'engineName',
      'heaterSetpointC',
      'secret',
      'siteId',
      'username',
    ]);
    expect(await authenticateDevice(models, d.username, d.secret)).toEqual({ deviceId: expect.any(Number), engineId: d.engineId });

    for (const email of ['admin', 'planner', 'tech', 'operator']) {
      await request(t.app)
        .post('/api/auth/login')
        .send({ email: `${email}@jacketwatch.test`, password: DEMO_PASSWORD })
        .expect(200);
    }
    // the four accounts see every site; the extra operator only its own
    const sitesOf = async (email: string) => {
      const token = (await request(t.app).post('/api/auth/login').send({ email, password: DEMO_PASSWORD }).expect(200)).body.token;
      return (
        await request(t.app)
          .get('/api/sites')
          .set({ Authorization: `Bearer ${token}` })
          .expect(200)
      ).body
        .map((s: { name: string }) => s.name)
        .sort();
    };
    for (const email of ['admin', 'planner', 'tech', 'operator']) expect(await sitesOf(`${email}@jacketwatch.test`)).toHaveLength(3);
    expect(await sitesOf('ridge-operator@jacketwatch.test')).toEqual(['Ridgeback Booster Station']);
    const again = await seedDemo(sequelize, models, config, { bcryptCost: 4 });
    expect(again.created).toBe(false);
    expect(await models.Engine.count()).toBe(8);
    expect(again.devices.map((x) => x.secret)).toEqual(file.devices.map((x: { secret: string }) => x.secret));
  });

  it('refuses demo accounts in production', async () => {
    await expect(seedDemo(t.ctx.sequelize, t.ctx.models, { ...t.ctx.config, production: true })).rejects.toThrow(/production/);
  });

  it('seeds a benchmark fleet of N engines with devices', async () => {
    const r = await seedFleet(t.ctx.sequelize, t.ctx.models, t.ctx.config, 30, { perSite: 25, bcryptCost: 4 });
    expect(r.devices).toHaveLength(30);
    expect(new Set(r.devices.map((d) => d.engineId)).size).toBe(30);
    expect(JSON.parse(fs.readFileSync(r.devicesFile, 'utf8')).devices).toHaveLength(30);
    expect(await authenticateDevice(t.ctx.models, r.devices[29].username, r.devices[29].secret)).not.toBeNull();
  });
});
