import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { Sequelize, Transaction } from 'sequelize';
import type { Config } from '../server/config';
import type { Engine, Models } from '../server/models';
import { hashSecret } from '../server/services/passwords';
import { DEMO_ENGINES, DEMO_PASSWORD, DEMO_SITE_USERS, DEMO_SITES, DEMO_USERS } from './demo-scenario';
import { seedCoolantDemo } from './coolant-demo';
import { seedOncall } from './oncall';
import { seedWorkDemo } from './work-demo';

/** One line of the devices file the simulator reads. */
export interface DeviceRecord {
  engineId: number;
  username: string;
  secret: string;
  engineName: string;
  siteId: number;
  duty: string;
  capacityL: number;
  capPressureKpa: number;
  heaterSetpointC: number | null;
  coolantFamily: string;
}

export interface SeedOptions {
  /** bcrypt cost for seeded users and devices (tests pass a low one). */
  bcryptCost?: number;
  /** Where to write the devices file; default DATA_DIR/demo-devices.json. */
  devicesFile?: string;
}

/** Demo and benchmark device secrets are derived from the username, so the devices file can always be rewritten. */
export const demoDeviceSecret = (username: string): string =>
  crypto.createHash('sha256').update(`jacketwatch-demo-device:${username}`).digest('base64url').slice(0, 32);

function deviceRecord(engine: Engine, username: string): DeviceRecord {
  return {
    engineId: engine.id,
    username,
    secret: demoDeviceSecret(username),
    engineName: engine.name,
    siteId: engine.siteId,
    duty: engine.duty,
    capacityL: engine.capacityL,
    capPressureKpa: engine.capPressureKpa,
    heaterSetpointC: engine.heaterSetpointC,
    coolantFamily: engine.coolantFamily,
  };
}

export function writeDevicesFile(file: string, mqttPort: number, devices: DeviceRecord[]): void {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const body = { ...(mqttPort > 0 ? { mqttPort } : {}), devices };
  fs.writeFileSync(file, JSON.stringify(body, null, 2) + '\n', { mode: 0o600 });
}

async function addDevices(models: Models, engines: Engine[], prefix: string, cost: number, transaction?: Transaction): Promise<DeviceRecord[]> {
  const records = engines.map((e) => deviceRecord(e, `${prefix}-${e.id}`));
  const rows = [];
  for (const r of records) rows.push({ engineId: r.engineId, username: r.username, secretHash: await hashSecret(r.secret, cost) });
  await models.Device.bulkCreate(rows, { transaction });
  return records;
}

export interface SeedResult {
  created: boolean;
  devicesFile: string;
  devices: DeviceRecord[];
}

/** The invented demo fleet, its accounts that see every site (two technicians) and one limited to a site. Does nothing (but rewrite the devices file) when users exist. */
export async function seedDemo(sequelize: Sequelize, models: Models, config: Config, opts: SeedOptions = {}): Promise<SeedResult> {
  if (config.production) throw new Error('refusing to create demo accounts with NODE_ENV=production');
  const devicesFile = opts.devicesFile ?? path.join(config.dataDir, 'demo-devices.json');
  const cost = opts.bcryptCost ?? 10;
  if ((await models.User.count()) > 0) {
    const devices = await models.Device.findAll({ include: [{ model: models.Engine, as: 'engine' }], order: [['id', 'ASC']] });
    const records = devices
      .filter((d) => d.username.startsWith('demo-engine-') && !d.revokedAt)
      .map((d) => deviceRecord((d as unknown as { engine: Engine }).engine, d.username));
    if (records.length) writeDevicesFile(devicesFile, config.mqttPort, records);
    return { created: false, devicesFile, devices: records };
  }
  const devices = await sequelize.transaction(async (transaction) => {
    const passwordHash = await hashSecret(DEMO_PASSWORD, cost);
    await models.User.bulkCreate(
      DEMO_USERS.map((u) => ({ ...u, passwordHash })),
      { transaction },
    );
    const siteIds = new Map<string, number>();
    for (const s of DEMO_SITES)
      siteIds.set(s.key, (await models.Site.create({ name: s.name, timeZone: s.timeZone, designLowTempC: s.designLowTempC }, { transaction })).id);
    for (const { sites, ...u } of DEMO_SITE_USERS) {
      const user = await models.User.create({ ...u, passwordHash }, { transaction });
      await models.UserSite.bulkCreate(
        sites.map((key) => ({ userId: user.id, siteId: siteIds.get(key)! })),
        { transaction },
      );
    }
    const engines: Engine[] = [];
    for (const { site, ...e } of DEMO_ENGINES) engines.push(await models.Engine.create({ ...e, siteId: siteIds.get(site)! }, { transaction }));
    await seedOncall(models, { transaction });
    await seedCoolantDemo(models, engines, { transaction });
    await seedWorkDemo(models, engines, { transaction });
    return addDevices(models, engines, 'demo-engine', cost, transaction);
  });
  writeDevicesFile(devicesFile, config.mqttPort, devices);
  return { created: true, devicesFile, devices };
}

export interface FleetOptions extends SeedOptions {
  /** Engines per site (default 25). */
  perSite?: number;
}

/**
 * N invented engines with one device each, for the benchmark; devices file default DATA_DIR/fleet-devices.json.
 * Low bcrypt cost by default (benchmark data only) so N device logins stay cheap.
 */
export async function seedFleet(sequelize: Sequelize, models: Models, config: Config, n: number, opts: FleetOptions = {}): Promise<SeedResult> {
  const perSite = opts.perSite ?? 25;
  const devicesFile = opts.devicesFile ?? path.join(config.dataDir, 'fleet-devices.json');
  const zones = ['America/Chicago', 'Europe/Berlin', 'Asia/Tokyo', 'Australia/Adelaide'];
  const devices = await sequelize.transaction(async (transaction) => {
    const engines: Engine[] = [];
    for (let s = 0; s * perSite < n; s++) {
      const site = await models.Site.create({ name: `Bench site ${s + 1}`, timeZone: zones[s % zones.length] }, { transaction });
      const count = Math.min(perSite, n - s * perSite);
      const rows = Array.from({ length: count }, (_, i) => ({
        siteId: site.id,
        name: `Bench engine ${s * perSite + i + 1}`,
        duty: 'standby' as const,
        capacityL: 60 + ((i * 37) % 300),
        coolantFamily: 'conventional' as const,
        glycolType: 'ethylene' as const,
        glycolPercent: 50,
        capPressureKpa: 100,
        oilDrainIntervalH: 250,
        heaterSetpointC: 40,
      }));
      engines.push(...(await models.Engine.bulkCreate(rows, { transaction, returning: true })));
    }
    return addDevices(models, engines, 'bench-engine', opts.bcryptCost ?? 4, transaction);
  });
  writeDevicesFile(devicesFile, config.mqttPort, devices);
  return { created: true, devicesFile, devices };
}
