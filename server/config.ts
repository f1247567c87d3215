import path from 'node:path';

/** Every setting of the server, read from the environment with safe defaults (listed in the README). */
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
  /** When set, send mail to this relay instead of the local mail catcher. */
  smtpHost: string | null;
  smtpUser: string | null;
  smtpPass: string | null;
  smtpSecure: boolean;
  mailFrom: string;
  publicUrl: string;
  production: boolean;
  logLevel: 'debug' | 'info' | 'warn' | 'error';
  /** RAW_RETENTION_DAYS [400]: raw readings older than this are removed; per-minute rollups are kept for good. 0 keeps raw readings for good. */
  rawRetentionDays: number;
  /** RETENTION_BATCH [4000], RETENTION_PAUSE_MS [100], RETENTION_EVERY_S [3600]: rows per step, pause between steps, time between sweeps. */
  retentionBatch: number;
  retentionPauseMs: number;
  retentionEveryMs: number;
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
  /** CLUSTER [on]: with PostgreSQL, live push between servers and engine leases (server/cluster); `off` for one server only. */
  cluster: boolean;
}

function intFrom(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new Error(`${name} must be a port number, got "${raw}"`);
  return n;
}

function countFrom(env: NodeJS.ProcessEnv, name: string, fallback: number, min: number, max: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < min || n > max) throw new Error(`${name} must be a whole number from ${min} to ${max}, got "${raw}"`);
  return n;
}

function textFrom(env: NodeJS.ProcessEnv, name: string): string | null {
  const raw = env[name];
  return raw === undefined || raw === '' ? null : raw;
}

/** TRUST_PROXY: empty/false, true, a hop count, or addresses/subnets (e.g. `loopback` or `10.0.0.0/8`). */
function trustProxyFrom(raw: string | undefined): boolean | number | string {
  if (!raw || raw === 'false' || raw === '0') return false;
  if (raw === 'true') return true;
  if (/^\d+$/.test(raw)) return Number(raw);
  return raw;
}

function deviceAccountsFrom(env: NodeJS.ProcessEnv): 'dynsec' | null {
  const raw = textFrom(env, 'MQTT_DEVICE_ACCOUNTS');
  if (raw === null) return null;
  if (raw !== 'dynsec') throw new Error(`MQTT_DEVICE_ACCOUNTS must be "dynsec" or empty, got "${raw}"`);
  return raw;
}

function secretFrom(env: NodeJS.ProcessEnv, name: string): string | null {
  const raw = textFrom(env, name);
  if (raw !== null && raw.length < 32) throw new Error(`${name} must be at least 32 characters (a random string, e.g. openssl rand -base64 48)`);
  return raw;
}

function sharedGroupFrom(env: NodeJS.ProcessEnv): string | null {
  const raw = textFrom(env, 'MQTT_SHARED_GROUP');
  if (raw !== null && !/^[A-Za-z0-9_-]{1,64}$/.test(raw)) throw new Error(`MQTT_SHARED_GROUP must be 1-64 letters, digits, - or _, got "${raw}"`);
  return raw;
}

function clusterFrom(env: NodeJS.ProcessEnv): boolean {
  const raw = textFrom(env, 'CLUSTER') ?? 'on';
  if (raw !== 'on' && raw !== 'off') throw new Error(`CLUSTER must be "on" or "off", got "${raw}"`);
  return raw === 'on';
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const port = intFrom(env, 'PORT', 3000);
  const dataDir = path.resolve(env.DATA_DIR || './data');
  const level = (env.LOG_LEVEL || 'info') as Config['logLevel'];
  const rawRetention = countFrom(env, 'RAW_RETENTION_DAYS', 400, 0, 100_000);
  return {
    port,
    mqttPort: intFrom(env, 'MQTT_PORT', 1883),
    smtpPort: intFrom(env, 'SMTP_PORT', 2525),
    dataDir,
    databaseUrl: env.DATABASE_URL || `sqlite:${path.join(dataDir, 'jacketwatch.sqlite')}`,
    mqttUrl: textFrom(env, 'MQTT_URL'),
    mqttClientId: textFrom(env, 'MQTT_CLIENT_ID') ?? 'jacketwatch-server',
    mqttDeviceAccounts: deviceAccountsFrom(env),
    mqttSharedGroup: sharedGroupFrom(env),
    smtpHost: textFrom(env, 'SMTP_HOST'),
    smtpUser: textFrom(env, 'SMTP_USER'),
    smtpPass: textFrom(env, 'SMTP_PASS'),
    smtpSecure: env.SMTP_SECURE === 'true',
    mailFrom: env.MAIL_FROM || 'jacketwatch@localhost',
    publicUrl: (env.PUBLIC_URL || `http://localhost:${port}`).replace(/\/$/, ''),
    production: env.NODE_ENV === 'production',
    logLevel: ['debug', 'info', 'warn', 'error'].includes(level) ? level : 'info',
    rawRetentionDays: rawRetention,
    // PostgreSQL drops whole months past the same retention (the batched sweep removes the rest)
    readingsRetentionDays: rawRetention > 0 ? rawRetention : null,
    retentionBatch: countFrom(env, 'RETENTION_BATCH', 4000, 1, 1_000_000),
    retentionPauseMs: countFrom(env, 'RETENTION_PAUSE_MS', 100, 0, 60_000),
    retentionEveryMs: countFrom(env, 'RETENTION_EVERY_S', 3600, 1, 7 * 86_400) * 1000,
    trustProxy: trustProxyFrom(env.TRUST_PROXY),
    host: env.HOST || '127.0.0.1',
    mqttHost: env.MQTT_HOST || '127.0.0.1',
    mqttTls: env.MQTT_TLS_CERT && env.MQTT_TLS_KEY
      ? { certFile: path.resolve(env.MQTT_TLS_CERT), keyFile: path.resolve(env.MQTT_TLS_KEY), port: intFrom(env, 'MQTT_TLS_PORT', 8883) }
      : null,

    jwtSecret: secretFrom(env, 'JWT_SECRET'),
    cluster: clusterFrom(env),
  };
}
