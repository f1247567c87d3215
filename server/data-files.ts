import fs from 'node:fs';
import path from 'node:path';

/** Everything the service writes under DATA_DIR is for its own user only (password hashes, uploads). */
export const OWNER_ONLY_UMASK = 0o077;

/**
 * New files owner-only from here on (umask: the database, its WAL and shared-memory file, uploads,
 * the JWT secret), and files left by an older version tightened to 0600 / folders to 0700.
 */
export function restrictDataFiles(dataDir: string, dbFile: string | null): void {
  process.umask(OWNER_ONLY_UMASK);
  fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  fs.chmodSync(dataDir, 0o700);
  const files = [path.join(dataDir, 'jwt-secret')];
  if (dbFile) files.push(dbFile, `${dbFile}-wal`, `${dbFile}-shm`, `${dbFile}-journal`);
  for (const f of files) if (fs.existsSync(f)) fs.chmodSync(f, 0o600);
  const uploads = path.join(dataDir, 'uploads');
  if (fs.existsSync(uploads)) {
    fs.chmodSync(uploads, 0o700);
    for (const name of fs.readdirSync(uploads)) fs.chmodSync(path.join(uploads, name), 0o600);
  }
}

/** The SQLite file of a `sqlite:` URL, or null for another database or :memory:. */
export function sqliteFileOf(databaseUrl: string): string | null {
  if (!databaseUrl.startsWith('sqlite:')) return null;
  const rest = databaseUrl.replace(/^sqlite:(\/\/)?/, '');
  return rest === '' || rest === ':memory:' ? null : path.resolve(rest);
}
