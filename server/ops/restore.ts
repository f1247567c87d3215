/**
 * `npm run restore -- --from FILE`: puts a backup made by `npm run backup` into an EMPTY DATA_DIR
 * (the database file and FILE.uploads/ as DATA_DIR/uploads). A folder that holds anything is refused,
 * so a restore never overwrites data. `--check` only checks the backup (integrity and row counts).
 * The JWT secret is not part of a backup: the restored server makes a new one, and users sign in again.
 */
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import sqlite3 from 'sqlite3';
import { loadConfig, type Config } from '../config';
import { uploadsDir } from '../services/work-orders/attachment-service';
import { uploadsBeside } from './backup';
import { SqliteFile, sqliteFileOf, summarise, type BackupSummary } from './sqlite-file';

/** Integrity and contents of a backup file; refuses one that is not a sound Jacketwatch database. */
export async function checkBackup(from: string): Promise<BackupSummary> {
  const file = path.resolve(from);
  if (!fs.existsSync(file)) throw new Error(`no backup at ${file}`);
  const db = await SqliteFile.open(file, sqlite3.OPEN_READONLY);
  try {
    const summary = await summarise(db);
    if (summary.integrity !== 'ok') throw new Error(`${file} failed its integrity check: ${summary.integrity}`);
    if (!summary.migrations.length || summary.rows.readings === undefined)
      throw new Error(`${file} is not a Jacketwatch database (no migrations or readings table)`);
    return summary;
  } catch (err) {
    if ((err as { code?: string }).code === 'SQLITE_NOTADB') throw new Error(`${file} is not a SQLite database`);
    throw err;
  } finally {
    await db.close();
  }
}

export interface RestoreResult extends BackupSummary {
  dataDir: string;
  file: string;
  uploadFiles: number;
}

export async function restore(config: Pick<Config, 'dataDir' | 'databaseUrl'>, from: string): Promise<RestoreResult> {
  const dataDir = path.resolve(config.dataDir);
  const target = sqliteFileOf(config);
  if (fs.existsSync(dataDir) && fs.readdirSync(dataDir).length > 0) {
    throw new Error(`DATA_DIR ${dataDir} is not empty: restore only into an empty or new folder, so that nothing is overwritten`);
  }
  if (fs.existsSync(target)) throw new Error(`${target} exists already: restore only where there is no database`);
  const summary = await checkBackup(from);
  fs.mkdirSync(dataDir, { recursive: true });
  fs.mkdirSync(path.dirname(target), { recursive: true });
  fs.copyFileSync(path.resolve(from), target, fs.constants.COPYFILE_EXCL);
  let uploadFiles = 0;
  const uploads = uploadsBeside(path.resolve(from));
  if (fs.existsSync(uploads)) {
    fs.cpSync(uploads, uploadsDir(dataDir), { recursive: true, errorOnExist: true, force: false, preserveTimestamps: true });
    uploadFiles = fs.readdirSync(uploadsDir(dataDir), { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).length;
  }
  return { dataDir, file: target, uploadFiles, ...summary };
}

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { from: { type: 'string' }, check: { type: 'boolean' }, help: { type: 'boolean' } } });
  if (values.help || !values.from) {
    console.error('usage: npm run restore -- --from FILE [--check]   (into DATA_DIR, which must be empty; --check only checks the backup)');
    process.exit(values.help ? 0 : 2);
  }
  const result = values.check ? await checkBackup(values.from) : await restore(loadConfig(), values.from);
  console.log(JSON.stringify(result, null, 2));
}

if (require.main === module) {
  main().catch((err: Error) => {
    console.error(`restore failed: ${err.message}`);
    process.exit(1);
  });
}
