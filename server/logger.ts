/** A small levelled logger writing one line per event to stderr; enough for a single process. */
export type LogLevel = 'debug' | 'info' | 'warn' | 'error';
const ORDER: Record<LogLevel, number> = { debug: 10, info: 20, warn: 30, error: 40 };

export interface Logger {
  debug(msg: string, extra?: unknown): void;
  info(msg: string, extra?: unknown): void;
  warn(msg: string, extra?: unknown): void;
  error(msg: string, extra?: unknown): void;
}

export function createLogger(level: LogLevel = 'info', name = 'jacketwatch'): Logger {
  const write = (at: LogLevel) => (msg: string, extra?: unknown) => {
    if (ORDER[at] < ORDER[level]) return;
    const tail = extra === undefined ? '' : ' ' + (extra instanceof Error ? extra.stack ?? extra.message : JSON.stringify(extra));
    process.stderr.write(`${new Date().toISOString()} ${at.toUpperCase()} [${name}] ${msg}${tail}\n`);
  };
  return { debug: write('debug'), info: write('info'), warn: write('warn'), error: write('error') };
}
