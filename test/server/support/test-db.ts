/**
 * Which database the server tests run on, from one setting: JW_TEST_PG_URL (a superuser URL of a throwaway
 * PostgreSQL cluster, set by scripts/with-postgres.ts) selects PostgreSQL, otherwise each test app gets its
 * own SQLite file in its DATA_DIR as before. On PostgreSQL every test app gets a fresh database
 * (jw_t_<random>), dropped again on close.
 */
import crypto from 'node:crypto';
import path from 'node:path';

/** The few calls of `pg` used by the tests (the tree has no @types/pg). */
export interface PgClient {
  connect(): Promise<void>;
  query<R = Record<string, unknown>>(sql: string, params?: unknown[]): Promise<{ rows: R[]; rowCount: number | null }>;
  end(): Promise<void>;
}
// eslint-disable-next-line @typescript-eslint/no-require-imports
const pg = require('pg') as {
  Client: new (opts: { connectionString: string; types?: PgTypes }) => PgClient;
  types: PgTypes;
};
export const { Client } = pg;

interface PgTypes {
  getTypeParser(oid: number, format?: string): (text: string) => unknown;
}
/** BIGINT (timestamps, COUNT) and NUMERIC as numbers, as SQLite gives them, for the tests' own queries. */
export const numericTypes: PgTypes = {
  getTypeParser: (oid, format) => (oid === 20 || oid === 1700 ? Number : pg.types.getTypeParser(oid, format)),
};

export const PG_ADMIN_URL = process.env.JW_TEST_PG_URL || '';
export const isPg = PG_ADMIN_URL !== '';
export const DB_KIND = isPg ? 'PostgreSQL' : 'SQLite';

export interface TestDatabase {
  /** DATABASE_URL for loadConfig or a server process. */
  url: string;
  drop(): Promise<void>;
}

async function admin<T>(fn: (c: PgClient) => Promise<T>): Promise<T> {
  const c = new Client({ connectionString: PG_ADMIN_URL });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

/** A fresh database: on PostgreSQL a new one in the test cluster, on SQLite a file in `dataDir`. */
export async function createTestDatabase(dataDir: string, file = 'jacketwatch.sqlite'): Promise<TestDatabase> {
  if (!isPg) return { url: `sqlite:${path.join(dataDir, file)}`, drop: async () => undefined };
  const name = `jw_t_${crypto.randomBytes(6).toString('hex')}`;
  await admin((c) => c.query(`CREATE DATABASE ${name}`));
  const url = new URL(PG_ADMIN_URL);
  url.pathname = `/${name}`;
  return {
    url: url.toString(),
    drop: () => admin((c) => c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`)).then(() => undefined),
  };
}
