import sqlite3 from 'sqlite3';
import type { Config } from '../config';

/** The SQLite file behind DATABASE_URL; backup and restore handle SQLite only (PostgreSQL has its own tools). */
export function sqliteFileOf(config: Pick<Config, 'databaseUrl'>): string {
  const m = /^sqlite:(?:\/\/)?(.+)$/.exec(config.databaseUrl);
  if (!m || m[1] === ':memory:') {
    throw new Error(
      `backup and restore handle a SQLite file only; DATABASE_URL is "${config.databaseUrl.replace(/\/\/[^@]*@/, '//***@')}" (use the database's own dump tool)`,
    );
  }
  return m[1];
}

/** A small promise wrapper over one node-sqlite3 connection. */
export class SqliteFile {
  private readonly db: sqlite3.Database;
  private constructor(db: sqlite3.Database) {
    this.db = db;
  }

  static open(file: string, mode = sqlite3.OPEN_READWRITE): Promise<SqliteFile> {
    return new Promise((resolve, reject) => {
      const db = new sqlite3.Database(file, mode, (err) => {
        if (err) return reject(err);
        db.configure('busyTimeout', 10_000);
        resolve(new SqliteFile(db));
      });
    });
  }

  all<T>(sql: string, params: unknown[] = []): Promise<T[]> {
    return new Promise((resolve, reject) => this.db.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
  }

  run(sql: string, params: unknown[] = []): Promise<void> {
    return new Promise((resolve, reject) => this.db.run(sql, params, (err) => (err ? reject(err) : resolve())));
  }

  close(): Promise<void> {
    return new Promise((resolve, reject) => this.db.close((err) => (err ? reject(err) : resolve())));
  }
}

export interface BackupSummary {
  /** `PRAGMA integrity_check` of the file: 'ok' or the first problems found. */
  integrity: string;
  /** Rows per table. */
  rows: Record<string, number>;
  /** Newest reading in the file (ms since epoch), null when there is none. */
  newestReadingTs: number | null;
  /** Migrations applied to the file. */
  migrations: string[];
}

/** What a database file holds, and whether SQLite finds it sound: used to check a backup. */
export async function summarise(db: SqliteFile): Promise<BackupSummary> {
  const check = await db.all<{ integrity_check: string }>('PRAGMA integrity_check');
  const integrity = check
    .map((r) => r.integrity_check)
    .slice(0, 10)
    .join('; ');
  const tables = await db.all<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name");
  const rows: Record<string, number> = {};
  for (const { name } of tables) rows[name] = (await db.all<{ n: number }>(`SELECT COUNT(*) AS n FROM "${name.replace(/"/g, '""')}"`))[0].n;
  // raw readings, and compacted ones (server/services/history) where the file has them
  const newestOf = async (sql: string) => (await db.all<{ ts: number | null }>(sql))[0].ts;
  const candidates = [
    rows.readings !== undefined ? await newestOf('SELECT MAX(ts) AS ts FROM readings') : null,
    rows.reading_blocks !== undefined ? await newestOf('SELECT MAX(last_ts) AS ts FROM reading_blocks') : null,
  ].filter((ts): ts is number => ts !== null);
  const newest = candidates.length ? Math.max(...candidates) : null;
  const migrations =
    rows.schema_migrations !== undefined ? (await db.all<{ name: string }>('SELECT name FROM schema_migrations ORDER BY name')).map((r) => r.name) : [];
  return { integrity, rows, newestReadingTs: newest, migrations };
}
