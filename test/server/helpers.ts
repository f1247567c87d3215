import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Express } from 'express';
import request from 'supertest';
import type { AppContext } from '../../server/app-context';
import { createApp } from '../../server/app';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { loadConfig } from '../../server/config';
import { migrate } from '../../server/db/migrate';
import { createSequelize } from '../../server/db/sequelize';
import { createLogger } from '../../server/logger';
import { initModels } from '../../server/models';
import type { Role } from '../../server/models/user';
import { createUser } from '../../server/services/users';
import type { IngestCounters, LiveState } from '../../server/telemetry/types';
import { createTestDatabase } from './support/test-db';

export { DB_KIND, isPg } from './support/test-db';

export const PASSWORD = 'correct-horse-battery';
export const ROLE_LIST: Role[] = ['admin', 'planner', 'technician', 'operator'];

/** Test scaffolding: a live state that knows one engine's coolant temperature. */
export function fixedLiveState(engineId: number, ts: number): LiveState {
  return {
    latest: (id) => (id === engineId ? { coolant_temp: { value: 41.5, ts, quality: 0 } } : {}),
    lastSeen: (id) => (id === engineId ? ts : null),
    runState: (id) => (id === engineId ? 'stopped' : 'no-data'),
  };
}

const counters: IngestCounters = {
  received: 12,
  stored: 10,
  duplicate: 0,
  oversizePacketsClosed: 0,
  rejected: { schema: 2 },
  outOfRange: 1,
  buffered: 0,
  batches: 3,
  batchLatencyMs: { last: 1, p50: 1, p95: 2, max: 3 },
  startedAt: new Date(0).toISOString(),
};

export interface TestApp {
  app: Express;
  ctx: AppContext;
  dataDir: string;
  tokens: Record<Role, string>;
  userIds: Record<Role, number>;
  close(): Promise<void>;
}

/** A real database (SQLite file in a fresh DATA_DIR, or a fresh PostgreSQL database with JW_TEST_PG_URL), migrated, with one signed-in user per role. */
export async function makeTestApp(opts: { signIn?: boolean } = {}): Promise<TestApp> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-server-'));
  const db = await createTestDatabase(dataDir);
  const config = loadConfig({ DATA_DIR: dataDir, DATABASE_URL: db.url, PORT: '0', MQTT_PORT: '0', SMTP_PORT: '0', LOG_LEVEL: 'error' });
  const log = createLogger('error');
  const sequelize = createSequelize(config, log);
  await migrate(sequelize);
  const models = initModels(sequelize);
  const tokens = createTokenService(loadJwtSecret(dataDir));
  const ctx: AppContext = { config, log, sequelize, models, tokens, telemetry: null, startedAt: Date.now() };
  ctx.telemetry = { liveState: fixedLiveState(-1, 0), counters: () => counters };
  const app = createApp(ctx, { staticDir: path.join(dataDir, 'no-app') });
  const out = { tokens: {}, userIds: {} } as Pick<TestApp, 'tokens' | 'userIds'>;
  for (const role of ROLE_LIST) {
    const u = await createUser(models, { email: `${role}@example.test`, name: `Test ${role}`, password: PASSWORD, role }, 4);
    out.userIds[role] = u.id;
    if (opts.signIn !== false) {
      const res = await request(app)
        .post('/api/auth/login')
        .send({ email: `${role}@example.test`, password: PASSWORD })
        .expect(200);
      out.tokens[role] = res.body.token;
    }
  }
  return {
    app,
    ctx,
    dataDir,
    ...out,
    async close() {
      await sequelize.close();
      await db.drop();
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export const auth = (token: string) => ({ Authorization: `Bearer ${token}` });
