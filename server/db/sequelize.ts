import { Sequelize, type Options } from 'sequelize';
import sqlite3 from 'sqlite3';
import type { Config } from '../config';
import type { Logger } from '../logger';

/** Set on every SQLite connection: Sequelize opens a separate one per transaction, so a one-off PRAGMA would not reach it. */
export const SQLITE_PRAGMAS = ['journal_mode=WAL', 'synchronous=NORMAL', 'busy_timeout=5000', 'foreign_keys=ON'];

type DbCallback = (err: Error | null) => void;

/**
 * Sequelize 6's SQLite connection manager opens connections itself without running the afterConnect hook,
 * so the pragmas go into the driver: a Database whose open callback fires only after they are set.
 */
class PragmaDatabase extends sqlite3.Database {
  constructor(filename: string, mode: number, callback?: DbCallback) {
    super(filename, mode, (err) => {
      if (err) return callback?.(err);
      this.exec(SQLITE_PRAGMAS.map((p) => `PRAGMA ${p};`).join(' '), (e) => callback?.(e ?? null));
    });
  }
}

const sqliteWithPragmas = { ...sqlite3, Database: PragmaDatabase };

/** A connection of our own to the SQLite file, with the same pragmas as Sequelize's (the reading writer's). */
export function openSqliteConnection(file: string): Promise<sqlite3.Database> {
  return new Promise((resolve, reject) => {
    const db: sqlite3.Database = new PragmaDatabase(file, sqlite3.OPEN_READWRITE, (err) => (err ? reject(err) : resolve(db)));
  });
}

/** `sqlite:/abs/file.sqlite`, `sqlite://./rel.sqlite` or `sqlite::memory:` to a storage path. */
function sqliteStorage(url: string): string {
  const rest = url.replace(/^sqlite:(\/\/)?/, '');
  return rest === ':memory:' || rest === '' ? ':memory:' : rest;
}

export function createSequelize(config: Pick<Config, 'databaseUrl' | 'logLevel'>, log: Logger): Sequelize {
  const logging: Options['logging'] = config.logLevel === 'debug' ? (sql: string) => log.debug(sql) : false;
  if (config.databaseUrl.startsWith('sqlite:')) {
    return new Sequelize({
      dialect: 'sqlite',
      storage: sqliteStorage(config.databaseUrl),
      dialectModule: sqliteWithPragmas,
      logging,
    });
  }
  return new Sequelize(config.databaseUrl, { logging });
}

export function isSqlite(sequelize: Sequelize): boolean {
  return sequelize.getDialect() === 'sqlite';
}
