import path from 'node:path';
import { z } from 'zod';
import { DEFAULT_OPENING_SETTINGS } from '../shared/work/opening-check';
import { LOG_LEVELS, type LogLevel } from './logger';
import { PRIORITIES } from './services/alarms/priority';

/** Every setting of the server, read from the environment (envSchema below) with safe defaults (listed in the README). */
export interface Config {
  port: number;
  mqttPort: number;
  smtpPort: number;
  dataDir: string;
  databaseUrl: string;
  /** When set, subscribe to this external broker instead of starting the embedded one. */
  mqttUrl: string | null;
  /** Client id at the external broker: fixed, so its persistent session (unacked messages) survives a restart. */
  mqttClientId: string;
  /** `dynsec`: device accounts are kept in the external broker's dynamic-security plugin; null: the broker's own business. */
  mqttDeviceAccounts: 'dynsec' | null;
  /** Several servers: subscribe as members of this MQTT v5 shared-subscription group, so each message goes to one. */
  mqttSharedGroup: string | null;
  /** SPARKPLUG_HOST_ID [jacketwatch]: the Sparkplug B host id of this system (`spBv1.0/STATE/<id>`; edge nodes name it as their primary host). */
  sparkplugHostId: string;
  /** When set, send mail to this relay instead of the local mail catcher. */
  smtpHost: string | null;
  smtpUser: string | null;
  smtpPass: string | null;
  smtpSecure: boolean;
  mailFrom: string;
  publicUrl: string;
  production: boolean;
  logLevel: LogLevel;
  /** RAW_RETENTION_DAYS [400]: raw readings older than this are removed; per-minute rollups are kept for good. 0 keeps raw readings for good. */
  rawRetentionDays: number;
  /** RETENTION_BATCH [4000], RETENTION_PAUSE_MS [100], RETENTION_EVERY_S [3600]: rows per step, pause between steps, time between sweeps. */
  retentionBatch: number;
  retentionPauseMs: number;
  retentionEveryMs: number;
  /** COMPACT_AFTER_H [24]: raw readings older than this many hours are packed into blocks (server/services/history); 0 keeps them raw. */
  compactAfterH: number;
  /** Interface of the HTTP server (HOST); loopback by default, 0.0.0.0 for every interface. */
  host: string;
  /** Interface of the embedded MQTT broker (MQTT_HOST); loopback by default. */
  mqttHost: string;
  /** MQTT over TLS when both are set: PEM files of the certificate (chain) and its key; port MQTT_TLS_PORT. */
  mqttTls: { certFile: string; keyFile: string; port: number } | null;
  /** Express 'trust proxy': false (default) ignores X-Forwarded-For; set only behind your own reverse proxy. */
  trustProxy: boolean | number | string;
  /** PostgreSQL: drop months of raw readings that ended longer ago than this (RAW_RETENTION_DAYS; rollups stay); null keeps all. */
  readingsRetentionDays: number | null;
  /** JWT signing secret shared by several servers; null: generated once into DATA_DIR/jwt-secret. */
  jwtSecret: string | null;
  /** V8 heap growth bound in per cent (0: V8's own choice), applied by server/heap-growth.ts */
  heapGrowingPercent: number;
  /** CLUSTER [on]: with PostgreSQL, live push between servers and engine leases (server/cluster); `off` for one server only. */
  cluster: boolean;
}

const empty = (v: unknown) => (v === '' ? undefined : v);
/** An optional variable: empty counts as unset. */
const opt = <T extends z.ZodType>(schema: T) => z.preprocess(empty, schema.optional());
const text = () => opt(z.string());
/** A number with its rule: the same message for text that is no number and for a number out of range. */
const num = (rule: string, ok: (n: number) => boolean) => z.coerce.number({ error: rule }).refine(ok, { error: rule });
const whole = (min: number, max: number) => num(`must be a whole number from ${min} to ${max}`, (n) => Number.isInteger(n) && n >= min && n <= max);
const port = () => num('must be a port number', (n) => Number.isInteger(n) && n >= 0 && n <= 65535);
const positiveSeconds = () => num('must be a positive number of seconds', (n) => Number.isFinite(n) && n > 0);
const secondsAtLeast0 = () => num('must be a number of seconds >= 0', (n) => Number.isFinite(n) && n >= 0);
const withDefault = <T extends z.ZodType>(schema: T, fallback: z.input<T>) => z.preprocess(empty, schema.default(fallback as never));

/**
 * Every environment variable the server, the seed and the demo read, in one place. The README's and
 * DEVELOPERS.md's configuration tables list exactly these (test/server/config.test.ts checks it).
 */
export const envSchema = z.object({
  PORT: withDefault(port(), 3000),
  MQTT_PORT: withDefault(port(), 1883),
  SMTP_PORT: withDefault(port(), 2525),
  DATA_DIR: withDefault(z.string(), './data'),
  DATABASE_URL: text(),
  MQTT_URL: text(),
  MQTT_CLIENT_ID: withDefault(z.string(), 'jacketwatch-server'),
  MQTT_DEVICE_ACCOUNTS: opt(z.literal('dynsec', { error: 'must be "dynsec" or empty' })),
  MQTT_SHARED_GROUP: opt(z.string().regex(/^[A-Za-z0-9_-]{1,64}$/, { error: 'must be 1-64 letters, digits, - or _' })),
  SPARKPLUG_HOST_ID: withDefault(z.string().regex(/^[A-Za-z0-9_.-]{1,64}$/, { error: 'must be 1-64 letters, digits, ., - or _' }), 'jacketwatch'),
  SMTP_HOST: text(),
  SMTP_USER: text(),
  SMTP_PASS: text(),
  SMTP_SECURE: withDefault(z.enum(['true', 'false'], { error: 'must be true or false' }), 'false'),
  MAIL_FROM: withDefault(z.string(), 'jacketwatch@localhost'),
  PUBLIC_URL: text(),
  NODE_ENV: text(),
  LOG_LEVEL: withDefault(z.enum(LOG_LEVELS, { error: `must be one of ${LOG_LEVELS.join(', ')}` }), 'info'),
  RAW_RETENTION_DAYS: withDefault(whole(0, 100_000), 400),
  RETENTION_BATCH: withDefault(whole(1, 1_000_000), 4000),
  RETENTION_PAUSE_MS: withDefault(whole(0, 60_000), 100),
  RETENTION_EVERY_S: withDefault(whole(1, 7 * 86_400), 3600),
  COMPACT_AFTER_H: withDefault(whole(0, 100_000), 24),
  TRUST_PROXY: text(),
  HOST: withDefault(z.string(), '127.0.0.1'),
  MQTT_HOST: withDefault(z.string(), '127.0.0.1'),
  MQTT_TLS_CERT: text(),
  MQTT_TLS_KEY: text(),
  MQTT_TLS_PORT: withDefault(port(), 8883),
  JWT_SECRET: opt(z.string().min(32, { error: 'must be at least 32 characters (a random string, e.g. openssl rand -base64 48)' })),
  HEAP_GROWING_PERCENT: withDefault(whole(0, 1000), 50),
  CLUSTER: withDefault(z.enum(['on', 'off'], { error: 'must be "on" or "off"' }), 'on'),
  // alarms and mail (server/services/alarms/alarm-settings.ts)
  ESCALATE_AFTER_S: withDefault(positiveSeconds(), 15 * 60),
  NOTIFY_MIN_PRIORITY: withDefault(z.enum(PRIORITIES, { error: `must be ${PRIORITIES.join(', ')}` }), 'medium'),
  ALARM_TICK_MS: withDefault(
    num('must be a positive number of milliseconds', (n) => Number.isFinite(n) && n > 0),
    1000,
  ),
  MAIL_RETRY_BASE_S: withDefault(positiveSeconds(), 5),
  MAIL_RETRY_MAX_S: withDefault(positiveSeconds(), 600),
  MAIL_TIMEOUT_S: withDefault(positiveSeconds(), 5),
  MAIL_PARALLEL: withDefault(whole(1, 100), 4),
  ALARM_LATE_AFTER_S: withDefault(positiveSeconds(), 120),
  ALARM_CHATTER_COUNT: withDefault(whole(2, 1000), 3),
  ALARM_CHATTER_WINDOW_S: withDefault(positiveSeconds(), 60),
  // opening check of gated work-order steps (server/services/work-orders/opening-settings.ts)
  OPENING_MIN_STOPPED_S: withDefault(secondsAtLeast0(), DEFAULT_OPENING_SETTINGS.minStoppedS),
  OPENING_HOLD_S: withDefault(secondsAtLeast0(), DEFAULT_OPENING_SETTINGS.holdS),
  // the demo (npm start): arguments of the simulator it starts
  SIM_ARGS: withDefault(z.string(), '--rate 1 --seed 1'),
});

export type Env = z.output<typeof envSchema>;
/** The names of every configuration variable. */
export const CONFIG_VARIABLES = Object.keys(envSchema.shape) as (keyof Env)[];

/** Thrown for a wrong setting; the message names every wrong variable, its rule and its value. */
export class ConfigError extends Error {
  override name = 'ConfigError';
}

/** The environment checked against the one schema; throws a ConfigError naming each wrong variable. */
export function parseEnv(env: NodeJS.ProcessEnv = process.env): Env {
  const picked = Object.fromEntries(CONFIG_VARIABLES.map((k) => [k, env[k]]));
  const result = envSchema.safeParse(picked);
  if (result.success) return result.data;
  const lines = result.error.issues.map((i) => {
    const name = String(i.path[0]);
    const rule = i.message.startsWith('must ') ? i.message : `is not valid (${i.message})`;
    return `${name} ${rule}, got "${env[name]}"`;
  });
  throw new ConfigError(lines.join('; '));
}

/** TRUST_PROXY: empty/false, true, a hop count, or addresses/subnets (e.g. `loopback` or `10.0.0.0/8`). */
function trustProxyFrom(raw: string | undefined): boolean | number | string {
  if (!raw || raw === 'false' || raw === '0') return false;
  if (raw === 'true') return true;
  if (/^\d+$/.test(raw)) return Number(raw);
  return raw;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const e = parseEnv(env);
  const dataDir = path.resolve(e.DATA_DIR);
  return {
    port: e.PORT,
    mqttPort: e.MQTT_PORT,
    smtpPort: e.SMTP_PORT,
    dataDir,
    databaseUrl: e.DATABASE_URL ?? `sqlite:${path.join(dataDir, 'jacketwatch.sqlite')}`,
    mqttUrl: e.MQTT_URL ?? null,
    mqttClientId: e.MQTT_CLIENT_ID,
    mqttDeviceAccounts: e.MQTT_DEVICE_ACCOUNTS ?? null,
    mqttSharedGroup: e.MQTT_SHARED_GROUP ?? null,
    sparkplugHostId: e.SPARKPLUG_HOST_ID,
    smtpHost: e.SMTP_HOST ?? null,
    smtpUser: e.SMTP_USER ?? null,
    smtpPass: e.SMTP_PASS ?? null,
    smtpSecure: e.SMTP_SECURE === 'true',
    mailFrom: e.MAIL_FROM,
    publicUrl: (e.PUBLIC_URL ?? `http://localhost:${e.PORT}`).replace(/\/$/, ''),
    production: e.NODE_ENV === 'production',
    logLevel: e.LOG_LEVEL,
    rawRetentionDays: e.RAW_RETENTION_DAYS,
    // PostgreSQL drops whole months past the same retention (the batched sweep removes the rest)
    readingsRetentionDays: e.RAW_RETENTION_DAYS > 0 ? e.RAW_RETENTION_DAYS : null,
    retentionBatch: e.RETENTION_BATCH,
    retentionPauseMs: e.RETENTION_PAUSE_MS,
    retentionEveryMs: e.RETENTION_EVERY_S * 1000,
    compactAfterH: e.COMPACT_AFTER_H,
    trustProxy: trustProxyFrom(e.TRUST_PROXY),
    host: e.HOST,
    mqttHost: e.MQTT_HOST,
    mqttTls:
      e.MQTT_TLS_CERT && e.MQTT_TLS_KEY ? { certFile: path.resolve(e.MQTT_TLS_CERT), keyFile: path.resolve(e.MQTT_TLS_KEY), port: e.MQTT_TLS_PORT } : null,
    jwtSecret: e.JWT_SECRET ?? null,
    heapGrowingPercent: e.HEAP_GROWING_PERCENT,
    cluster: e.CLUSTER === 'on',
  };
}
