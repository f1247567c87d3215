/**
 * `npm run backup -- --out FILE`: a consistent copy of the SQLite database, taken while the server runs and
 * ingests, plus the uploaded files beside it in FILE.uploads/. Settings as for the server (DATA_DIR, DATABASE_URL).
 *
 * The copy is made with `VACUUM INTO`: one read transaction, so the file is exactly the database as it was
 * at one instant (every reading committed before it, none after), while the server keeps writing through WAL.
 * The uploads are copied after that instant, so every attachment in the copy has its file.
 * The copy is written under a temporary name and renamed when complete and checked.
 */
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { loadConfig, type Config } from '../config';
import { uploadsDir } from '../services/work-orders/attachment-service';
import { SqliteFile, sqliteFileOf, summarise, type BackupSummary } from './sqlite-file';

export const uploadsBeside = (file: string) => `${file}.uploads`;

export interface BackupResult extends BackupSummary {
  file: string;
  uploads: string | null;
  uploadFiles: number;
  tookMs: number;
}

export async function backup(config: Pick<Config, 'dataDir' | 'databaseUrl'>, out: string): Promise<BackupResult> {
  const started = Date.now();
  const source = sqliteFileOf(config);
  const file = path.resolve(out);
  if (!fs.existsSync(source)) throw new Error(`no database at ${source} (check DATA_DIR or DATABASE_URL)`);
  if (fs.existsSync(file) || fs.existsSync(uploadsBeside(file)))
    throw new Error(`${file} or ${uploadsBeside(file)} exists already: choose a new name, nothing was overwritten`);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const partial = `${file}.partial`;
  fs.rmSync(partial, { force: true });

  const db = await SqliteFile.open(source);
  try {
    await db.run('VACUUM INTO ?', [partial]);
  } finally {
    await db.close();
  }
  const copy = await SqliteFile.open(partial);
  let summary: BackupSummary;
  try {
    summary = await summarise(copy);
  } finally {
    await copy.close();
  }
  if (summary.integrity !== 'ok') {
    fs.rmSync(partial, { force: true });
    throw new Error(`the copy failed its integrity check (${summary.integrity}); nothing was kept`);
  }
  fs.renameSync(partial, file);

  const from = uploadsDir(config.dataDir);
  let uploads: string | null = null;
  let uploadFiles = 0;
  if (fs.existsSync(from)) {
    uploads = uploadsBeside(file);
    fs.cpSync(from, uploads, { recursive: true, errorOnExist: true, force: false, preserveTimestamps: true });
    uploadFiles = fs.readdirSync(uploads, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).length;
  }
  return { file, uploads, uploadFiles, ...summary, tookMs: Date.now() - started };
}

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { out: { type: 'string' }, help: { type: 'boolean' } } });
  if (values.help || !values.out) {
    console.error('usage: npm run backup -- --out FILE   (DATA_DIR / DATABASE_URL as for the server; uploads go to FILE.uploads/)');
    process.exit(values.help ? 0 : 2);
  }
  const result = await backup(loadConfig(), values.out);
  console.log(JSON.stringify(result, null, 2));
}

if (require.main === module) {
  main().catch((err: Error) => {
    console.error(`backup failed: ${err.message}`);
    process.exit(1);
  });
}
