/** A real database (SQLite file in a temp folder, or a fresh PostgreSQL database with JW_TEST_PG_URL) with every migration applied, for the alarm and mail tests. */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Sequelize } from 'sequelize';
import { createLogger } from '../../../server/logger';
import { createSequelize } from '../../../server/db/sequelize';
import { migrate } from '../../../server/db/migrate';
import { createTestDatabase } from './test-db';
export { freePort } from '../../../scripts/free-port';

export const quietLog = createLogger('error', 'test');

export interface TempDb {
  dir: string;
  sequelize: Sequelize;
  close(): Promise<void>;
}

export async function tempDb(prefix = 'jw-alarms-'): Promise<TempDb> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  const db = await createTestDatabase(dir, 'test.sqlite');
  const sequelize = createSequelize({ databaseUrl: db.url, logLevel: 'error' }, quietLog);
  await migrate(sequelize);
  return {
    dir,
    sequelize,
    async close() {
      await sequelize.close();
      await db.drop();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

export async function waitFor<T>(fn: () => Promise<T | null | undefined | false>, timeoutMs = 10000, stepMs = 100): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error('timed out waiting');
    await new Promise((r) => setTimeout(r, stepMs));
  }
}
