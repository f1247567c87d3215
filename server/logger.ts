import pino, { type Logger as PinoLogger } from 'pino';

/**
 * The server's log: pino, one JSON object per line on stderr. This thin wrapper keeps the call style of the
 * whole code base (`log.warn('text', extra)`); the underlying pino logger (`log.pino`) feeds the request log
 * (pino-http, see app.ts). `silent` turns everything off (tests: LOG_LEVEL=silent).
 */
export const LOG_LEVELS = ['debug', 'info', 'warn', 'error', 'silent'] as const;
export type LogLevel = (typeof LOG_LEVELS)[number];

export interface Logger {
  debug(msg: string, extra?: unknown): void;
  info(msg: string, extra?: unknown): void;
  warn(msg: string, extra?: unknown): void;
  error(msg: string, extra?: unknown): void;
  /** The pino logger behind this one (request logging, child loggers). */
  readonly pino?: PinoLogger;
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

/** pino's error serializer, with the message and SQL of database errors kept (see describeError). */
function serializeError(err: unknown): unknown {
  if (!(err instanceof Error)) return err;
  const base = pino.stdSerializers.err(err) as unknown as Record<string, unknown>;
  const sql = (err as { sql?: unknown }).sql;
  return { ...base, stack: describeError(err), ...(typeof sql === 'string' ? { sql: sql.slice(0, 500) } : {}) };
}

/** Wraps a pino logger in the code base's call style. */
export function wrapPino(p: PinoLogger): Logger {
  const write = (at: 'debug' | 'info' | 'warn' | 'error') => (msg: string, extra?: unknown) => {
    if (extra === undefined) p[at](msg);
    else if (extra instanceof Error) p[at]({ err: extra }, msg);
    else p[at]({ detail: extra }, msg);
  };
  return { debug: write('debug'), info: write('info'), warn: write('warn'), error: write('error'), pino: p };
}

export function createLogger(level: LogLevel = 'info', name = 'jacketwatch'): Logger {
  const p = pino(
    { name, level, serializers: { err: serializeError }, base: { pid: process.pid } },
    // synchronous: a line logged just before the process ends (or crashes) is not lost
    pino.destination({ fd: 2, sync: true }),
  );
  return wrapPino(p);
}
