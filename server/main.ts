import { ConfigError, loadConfig } from './config';
import { boundHeapGrowth } from './heap-growth';
import { createLogger } from './logger';
import { installProcessGuards } from './process-guards';
import { startServer } from './start';

/** `npm run server`: everything on the configured ports, no demo data. */
async function main(): Promise<void> {
  const config = loadConfig();
  boundHeapGrowth(config.heapGrowingPercent);
  const log = createLogger(config.logLevel);
  installProcessGuards(log);
  const server = await startServer(config, { log });
  let exiting = false;
  const shutdown = (signal: string) => {
    if (exiting) return;
    exiting = true;
    log.info(`${signal}: stopping`);
    server.stop().then(
      () => process.exit(0),
      (err) => {
        log.error('stop failed', err);
        process.exit(1);
      },
    );
  };
  process.on('SIGINT', () => shutdown('SIGINT'));
  process.on('SIGTERM', () => shutdown('SIGTERM'));
}

main().catch((err) => {
  // a wrong setting says which variable and why; anything else gets its stack
  const text = err instanceof ConfigError ? `configuration: ${err.message}` : err instanceof Error ? (err.stack ?? err.message) : String(err);
  process.stderr.write(`jacketwatch failed to start: ${text}\n`);
  process.exit(1);
});
