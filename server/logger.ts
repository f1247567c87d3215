/** A small levelled logger writing one line per event to stderr; enough for a single process. */
export type LogLevel = 'debug' | 'info' | 'warn' | 'error';
const ORDER: Record<LogLevel, number> = { debug: 10, info: 20, warn: 30, error: 40 };

export interface Logger {
  debug(msg: string, extra?: unknown): void;
  info(msg: string, extra?: unknown): void;
  warn(msg: string, extra?: unknown): void;
  error(msg: string, extra?: unknown): void;
}

/**
 * An error as text: name and message first, then the stack. Sequelize's database errors carry the stack of
 * the call site (starting "Error\n at ..."), not their message, so the message must be written on its own;
 * the failing SQL too, when the error holds it.
 */
export function describeError(err: Error): string {
  const head = `${err.name}: ${err.message}`;
  const stack = err.stack ?? '';
  const frames = stack.startsWith(head) ? stack.slice(head.length) : stack.replace(/^[^\n]*(\n|$)/, '\n');
  const sql = (err as { sql?: unknown }).sql;
  return head + (typeof sql === 'string' ? `\n  sql: ${sql.slice(0, 500)}` : '') + frames.replace(/\n$/, '');
}

export function createLogger(level: LogLevel = 'info', name = 'jacketwatch'): Logger {
  const write = (at: LogLevel) => (msg: string, extra?: unknown) => {
    if (ORDER[at] < ORDER[level]) return;
    const tail = extra === undefined ? '' : ' ' + (extra instanceof Error ? describeError(extra) : JSON.stringify(extra));
    process.stderr.write(`${new Date().toISOString()} ${at.toUpperCase()} [${name}] ${msg}${tail}\n`);
  };
  return { debug: write('debug'), info: write('info'), warn: write('warn'), error: write('error') };
}
