/**
 * The alarm feature on a real SQLite file with its real mail catcher (SMTP on a random loopback port)
 * and outbox. Readings go straight into the rule engine's onReadings handler (no broker needed);
 * what it would push to browsers is collected.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Express } from 'express';
import request from 'supertest';
import type { ChannelKey } from '../../../shared/channels';
import type { AppContext } from '../../../server/app-context';
import { createApp } from '../../../server/app';
import { alarmRouters } from '../../../server/routes';
import { loadJwtSecret } from '../../../server/auth/jwt-secret';
import { createTokenService } from '../../../server/auth/tokens';
import { loadConfig } from '../../../server/config';
import { migrate } from '../../../server/db/migrate';
import { createSequelize } from '../../../server/db/sequelize';
import { createLogger } from '../../../server/logger';
import { initModels } from '../../../server/models';
import type { Role } from '../../../server/models/user';
import { createAlarmFeature, type AlarmFeature } from '../../../server/services/alarms';
import { loadAlarmSettings, type AlarmSettings } from '../../../server/services/alarms/alarm-settings';
import { createUser } from '../../../server/services/users';
import type { AcceptedReading } from '../../../server/telemetry/types';
import { createTestDatabase } from './test-db';

export const PASSWORD = 'correct-horse-battery';
const ROLES: Role[] = ['admin', 'planner', 'technician', 'operator'];

export interface AlarmApp {
  app: Express;
  ctx: AppContext;
  feature: AlarmFeature;
  tokens: Record<Role | 'backup', string>;
  users: Record<Role | 'backup', { id: number; email: string }>;
  siteId: number;
  engineId: number;
  /** Pushed to browsers: [room, event, payload]. */
  pushed: [string, string, unknown][];
  /** Hand a batch to the rule engine exactly as telemetry would. */
  feed(batch: AcceptedReading[]): void;
  close(): Promise<void>;
}

export async function makeAlarmApp(settings: Partial<AlarmSettings> = {}): Promise<AlarmApp> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-alarmapp-'));
  const db = await createTestDatabase(dataDir);
  const config = loadConfig({
    DATA_DIR: dataDir,
    DATABASE_URL: db.url,
    PORT: '0',
    MQTT_PORT: '0',
    SMTP_PORT: '0',
    LOG_LEVEL: 'error',
    PUBLIC_URL: 'http://jacketwatch.test',
  });
  const log = createLogger('error');
  const sequelize = createSequelize(config, log);
  await migrate(sequelize);
  const models = initModels(sequelize);
  const tokens = createTokenService(loadJwtSecret(dataDir));
  const ctx: AppContext = { config, log, sequelize, models, tokens, telemetry: null, startedAt: Date.now() };
  const feature = createAlarmFeature(ctx, { ...loadAlarmSettings({}), mailRetryBaseMs: 200, mailRetryMaxMs: 1000, ...settings });
  const app = createApp(ctx, { staticDir: path.join(dataDir, 'no-app'), extraRouters: (doc) => alarmRouters(ctx, feature, doc) });

  const users = {} as AlarmApp['users'];
  const toks = {} as AlarmApp['tokens'];
  for (const role of [...ROLES, 'backup' as const]) {
    const email = `${role}@jacketwatch.test`;
    const u = await createUser(models, { email, name: `Test ${role}`, password: PASSWORD, role: role === 'backup' ? 'technician' : role }, 4);
    users[role] = { id: u.id, email };
    const res = await request(app).post('/api/auth/login').send({ email, password: PASSWORD }).expect(200);
    toks[role] = res.body.token;
  }
  const site = await models.Site.create({ name: 'Pump station North', timeZone: 'UTC' });
  const engine = await models.Engine.create({
    siteId: site.id,
    name: 'Fire pump 1',
    duty: 'standby',
    capacityL: 60,
    coolantFamily: 'conventional',
    glycolType: 'ethylene',
    glycolPercent: 50,
    capPressureKpa: 100,
    oilDrainIntervalH: 250,
  });
  await models.OncallShift.create({
    siteId: site.id,
    userId: users.technician.id,
    backupUserId: users.backup.id,
    startsAt: new Date(Date.now() - 3600_000),
    endsAt: new Date(Date.now() + 86400_000),
  });

  const pushed: AlarmApp['pushed'] = [];
  let listener: ((b: AcceptedReading[]) => void) | null = null;
  await feature.start({
    onReadings: (l) => {
      listener = l;
    },
    emit: (room, event, payload) => {
      for (const r of [room].flat()) pushed.push([r, event, payload]);
    },
    liveState: { latest: () => ({}), lastSeen: () => null, runState: () => 'no-data' },
  });
  return {
    app,
    ctx,
    feature,
    tokens: toks,
    users,
    siteId: site.id,
    engineId: engine.id,
    pushed,
    feed: (batch) => listener!(batch),
    async close() {
      await feature.stop();
      await sequelize.close();
      await db.drop();
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

/** One sample a second from `t0` for `seconds`: speed, coolant temperature and pressure. */
export function samples(
  engineId: number,
  t0: number,
  seconds: number,
  temp: (s: number) => number,
  opts: { rpm?: number; kpa?: number } = {},
): AcceptedReading[] {
  const out: AcceptedReading[] = [];
  for (let s = 0; s < seconds; s++) {
    const ts = t0 + s * 1000;
    const add = (channel: ChannelKey, value: number) => out.push({ engineId, channel, ts, value, quality: 0 });
    add('engine_speed', opts.rpm ?? 1800);
    add('coolant_temp', temp(s));
    add('coolant_pressure', opts.kpa ?? 90);
  }
  return out;
}

export const auth = (token: string) => ({ Authorization: `Bearer ${token}` });
