import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { seedDemo } from '../seeds/seed';
import { loadConfig, parseEnv } from './config';
import { createLogger } from './logger';
import { installProcessGuards } from './process-guards';
import { startServer } from './start';

/**
 * `npm start`: the whole demo on embedded defaults. Seeds the invented scenario when the DATA_DIR has
 * no users (and then publishes 30 days of history through the broker), starts broker, HTTP server and
 * mail catcher, then the simulator as a separate process, like a real gateway would be.
 * SIM_ARGS overrides the simulator's arguments, e.g. SIM_ARGS="--scenario overheat --speed 30".
 */
async function main(): Promise<void> {
  const config = loadConfig();
  const log = createLogger(config.logLevel, 'demo');
  installProcessGuards(log);
  if (config.production) throw new Error('npm start is the demo; with NODE_ENV=production use npm run server');
  const server = await startServer(config, { log });
  const seeded = await seedDemo(server.sequelize, server.models, config);
  log.info(seeded.created ? 'demo data created' : 'demo data present');

  const simArgs = parseEnv().SIM_ARGS.split(/\s+/).filter(Boolean);
  if (seeded.created) simArgs.push('--backfill-days', '30', '--backfill-step', '300');
  const tsx = path.resolve(__dirname, '../node_modules/.bin/tsx');
  const sim: ChildProcess = spawn(tsx, [path.resolve(__dirname, '../simulator/cli.ts'), ...simArgs], {
    stdio: 'inherit',
    env: { ...process.env, DATA_DIR: config.dataDir, MQTT_PORT: String(config.mqttPort) },
  });
  sim.on('exit', (code) => log.info(`simulator exited (${code ?? 'signal'})`));
  log.info(`Jacketwatch demo on http://localhost:${server.port}  (accounts in README.md, password jacketwatch-demo)`);

  let exiting = false;
  const shutdown = async (signal: string) => {
    if (exiting) return;
    exiting = true;
    log.info(`${signal}: stopping`);
    if (sim.exitCode === null) sim.kill('SIGTERM');
    await server.stop();
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

main().catch((err) => {
  process.stderr.write(`jacketwatch demo failed to start: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`);
  process.exit(1);
});
