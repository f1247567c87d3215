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
  /** PostgreSQL: drop months of raw readings that ended longer ago than this (rollups stay); null keeps all. */
  readingsRetentionDays: number | null;
  /** JWT signing secret shared by several servers; null: generated once into DATA_DIR/jwt-secret. */
  jwtSecret: string | null;
}

function intFrom(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new Error(`${name} must be a port number, got "${raw}"`);
  return n;
}

function textFrom(env: NodeJS.ProcessEnv, name: string): string | null {
  const raw = env[name];
  return raw === undefined || raw === '' ? null : raw;
}

function daysFrom(env: NodeJS.ProcessEnv, name: string): number | null {
  const raw = env[name];
  if (raw === undefined || raw === '') return null;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1) throw new Error(`${name} must be a whole number of days (1 or more), got "${raw}"`);
  return n;
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

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const port = intFrom(env, 'PORT', 3000);
  const dataDir = path.resolve(env.DATA_DIR || './data');
  const level = (env.LOG_LEVEL || 'info') as Config['logLevel'];
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
    readingsRetentionDays: daysFrom(env, 'READINGS_RETENTION_DAYS'),
    jwtSecret: secretFrom(env, 'JWT_SECRET'),
  };
}
