import type { MigrationContext } from '../migrate';

/**
 * Several servers on PostgreSQL: the socket.io PostgreSQL adapter passes events between servers with
 * NOTIFY, and keeps those larger than a NOTIFY payload (8000 bytes) in this table for a short while
 * (the table and its columns are the adapter's own). Nothing to do on SQLite (one process, no adapter).
 */
export async function up({ sequelize }: MigrationContext): Promise<void> {
  if (sequelize.getDialect() !== 'postgres') return;
  await sequelize.query(`CREATE TABLE IF NOT EXISTS socket_io_attachments (
    id bigserial UNIQUE,
    created_at timestamptz DEFAULT NOW(),
    payload bytea
  )`);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
  if (sequelize.getDialect() !== 'postgres') return;
  await sequelize.query('DROP TABLE IF EXISTS socket_io_attachments');
}
