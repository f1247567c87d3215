import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

/** Read DATA_DIR/jwt-secret, creating it (random, mode 600) on first start. */
export function loadJwtSecret(dataDir: string): string {
  const file = path.join(dataDir, 'jwt-secret');
  try {
    return fs.readFileSync(file, 'utf8').trim();
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOENT') throw err;
  }
  fs.mkdirSync(dataDir, { recursive: true });
  const secret = crypto.randomBytes(48).toString('base64url');
  try {
    fs.writeFileSync(file, secret + '\n', { mode: 0o600, flag: 'wx' });
  } catch (err) {
    // another process won the race: use its secret
    if ((err as NodeJS.ErrnoException).code === 'EEXIST') return fs.readFileSync(file, 'utf8').trim();
    throw err;
  }
  return secret;
}
