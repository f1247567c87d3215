/**
 * JWT_SECRET from the environment: several servers sign and accept the same tokens (a token from one
 * instance is good at the other), and no secret file is generated then. A real server process.
 */
import fs from 'node:fs';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import { createTokenService } from '../../server/auth/tokens';
import { loadConfig } from '../../server/config';
import { Db, startServerProcess, type ServerProcess } from './support/telemetry-server';

jest.setTimeout(60_000);

const SECRET = 'shared-test-secret-0123456789-abcdefghijklmnop';
let server: ServerProcess;

afterAll(async () => {
  await server?.stop('SIGKILL');
  if (server) fs.rmSync(server.dataDir, { recursive: true, force: true });
});

it('refuses a short JWT_SECRET', () => {
  expect(() => loadConfig({ JWT_SECRET: 'too-short' })).toThrow(/JWT_SECRET must be at least 32 characters/);
  expect(loadConfig({ JWT_SECRET: SECRET }).jwtSecret).toBe(SECRET);
  expect(loadConfig({}).jwtSecret).toBeNull();
});

it('a server with JWT_SECRET accepts a token signed elsewhere with it, and writes no secret file', async () => {
  server = await startServerProcess({ group: true, env: { JWT_SECRET: SECRET } });
  const db = new Db(server.databaseUrl);
  const now = new Date().toISOString();
  const id = await db.run(`INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', FALSE, ?, ?)`, [
    'jwt-admin@example.test',
    'JWT admin',
    bcrypt.hashSync('unused-secret-1', 4),
    now,
    now,
  ]);
  await db.close();
  const get = (token: string) => fetch(`${server.url}/api/devices`, { headers: { authorization: `Bearer ${token}` } }).then((r) => r.status);
  expect(await get(createTokenService(SECRET).sign({ id, email: 'jwt-admin@example.test', role: 'admin' }))).toBe(200);
  expect(await get(createTokenService('another-secret-0123456789-abcdefghijklmnop').sign({ id, email: 'jwt-admin@example.test', role: 'admin' }))).toBe(401);
  expect(fs.existsSync(path.join(server.dataDir, 'jwt-secret'))).toBe(false);
});
