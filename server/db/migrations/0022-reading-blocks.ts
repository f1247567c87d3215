import type { MigrationContext } from '../migrate';

/**
 * Compacted history: one row per (engine, channel, hour) holding that hour's raw readings packed by
 * shared/history/block-codec.ts (timestamps, values and qualities, lossless). The compactor
 * (server/services/history/compactor.ts) moves raw readings older than COMPACT_AFTER_H here, one block per
 * transaction; readers merge blocks and raw rows (server/services/history/raw-range.ts).
 * first_ts/last_ts/count let a reader skip blocks without decoding them.
 */
export async function up({ sequelize }: MigrationContext): Promise<void> {
  const postgres = sequelize.getDialect() === 'postgres';
  const big = postgres ? 'BIGINT' : 'INTEGER';
  await sequelize.transaction(async (transaction) => {
    const q = (sql: string) => sequelize.query(sql, { transaction, logging: false });
    await q(`CREATE TABLE reading_blocks (
      engine_id INTEGER NOT NULL,
      channel INTEGER NOT NULL,
      block_start ${big} NOT NULL,
      first_ts ${big} NOT NULL,
      last_ts ${big} NOT NULL,
      "count" INTEGER NOT NULL,
      data ${postgres ? 'BYTEA' : 'BLOB'} NOT NULL,
      PRIMARY KEY (engine_id, channel, block_start)
    )`);
    // the bytes are already packed: no point in PostgreSQL trying to compress them again
    if (postgres) await q('ALTER TABLE reading_blocks ALTER COLUMN data SET STORAGE EXTERNAL');
  });
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
  await sequelize.query('DROP TABLE reading_blocks');
}
