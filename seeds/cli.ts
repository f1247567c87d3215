import { loadConfig } from '../server/config';
import { migrate } from '../server/db/migrate';
import { createSequelize } from '../server/db/sequelize';
import { createLogger } from '../server/logger';
import { initModels } from '../server/models';
import { seedDemo, seedFleet } from './seed';

/** `npm run seed` (demo scenario) or `npm run seed -- --fleet N` (benchmark engines). */
async function main(): Promise<void> {
  const config = loadConfig();
  const log = createLogger(config.logLevel, 'seed');
  const args = process.argv.slice(2);
  const fleetAt = args.indexOf('--fleet');
  if (fleetAt < 0 && config.production) throw new Error('refusing to create demo accounts with NODE_ENV=production');
  const sequelize = createSequelize(config, log);
  try {
    await migrate(sequelize, log);
    const models = initModels(sequelize);
    if (fleetAt >= 0) {
      const n = Number(args[fleetAt + 1]);
      if (!Number.isInteger(n) || n < 1 || n > 100_000) throw new Error('--fleet needs a number of engines (1..100000)');
      const r = await seedFleet(sequelize, models, config, n);
      log.info(`fleet of ${r.devices.length} engines; devices in ${r.devicesFile}`);
    } else {
      const r = await seedDemo(sequelize, models, config);
      log.info(r.created ? `demo data created; devices in ${r.devicesFile}` : `users exist already: nothing seeded (devices file ${r.devicesFile} refreshed)`);
    }
  } finally {
    await sequelize.close();
  }
}

main().catch((err) => {
  process.stderr.write(`seed failed: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
