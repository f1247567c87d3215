import { Client } from 'pg';

const MIGRATION_LOCK = 0x4a570003;

/**
 * Several servers starting together on one PostgreSQL database: migrations (and the first reading partitions)
 * run under one advisory lock, so one server applies them and the others wait and then find nothing to do.
 * SQLite: just runs `fn` (one process).
 */
export async function underMigrationLock<T>(databaseUrl: string, fn: () => Promise<T>): Promise<T> {
  if (!/^postgres(ql)?:/.test(databaseUrl)) return fn();
  const client = new Client({ connectionString: databaseUrl, application_name: 'jacketwatch-migrate' });
  await client.connect();
  try {
    await client.query('SELECT pg_advisory_lock($1::int)', [MIGRATION_LOCK]);
    return await fn();
  } finally {
    await client.end().catch(() => undefined); // ending the session releases the lock
  }
}
