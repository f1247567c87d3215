/**
 * A compactor in its own process, for the kill -9 test: one pass over DATABASE_URL with COMPACT_PAUSE_MS between
 * steps, so the test can kill it part-way. Prints "done" when the pass ends.
 */
import { loadConfig } from '../../../server/config';
import { createSequelize } from '../../../server/db/sequelize';
import { createLogger } from '../../../server/logger';
import { startCompactor } from '../../../server/services/history/compactor';

async function main(): Promise<void> {
  const log = createLogger('error', 'compact-child');
  const config = loadConfig({ DATA_DIR: process.env.DATA_DIR, DATABASE_URL: process.env.DATABASE_URL, LOG_LEVEL: 'error' });
  const sequelize = createSequelize(config, log);
  const now = Number(process.env.COMPACT_NOW ?? Date.now());
  const pass = await startCompactor({
    sequelize,
    log,
    config: { compactAfterH: 24 },
    now: () => now,
    pauseMs: Number(process.env.COMPACT_PAUSE_MS ?? 0),
    timer: false,
  }).pass();
  await sequelize.close();
  process.stdout.write(`done ${JSON.stringify(pass)}\n`);
}

void main();
