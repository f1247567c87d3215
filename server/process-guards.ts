import type { Logger } from './logger';

/**
 * A promise rejected with nobody listening is a bug to log, not a reason to stop watching engines:
 * Node's default would end the process. Uncaught exceptions still end it (state may be broken).
 */
export function installProcessGuards(log: Logger): void {
  process.on('unhandledRejection', (reason) => {
    log.error('unhandled promise rejection (kept running)', reason instanceof Error ? reason : String(reason));
  });
}
