/**
 * `npm run create-admin` on a new installation: an empty database (NODE_ENV=production, so no demo accounts
 * could exist), the command run as its own process with the password on standard input, then a real server
 * on the same database where that administrator signs in. Refusals (weak password, e-mail taken, no password)
 * exit non-zero with the reason and create nobody.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { startServerProcess, type ServerProcess } from './support/telemetry-server';
import { createTestDatabase, type TestDatabase } from './support/test-db';
import { npmRun } from './support/npm-run';

const work = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-create-admin-'));
let database: TestDatabase;
let server: ServerProcess | null = null;

/** The command as an operator runs it on a production install, the password on standard input. */
const createAdmin = (args: string[], stdin: string | null) =>
  npmRun('create-admin', args, { NODE_ENV: 'production', DATA_DIR: work, DATABASE_URL: database.url, LOG_LEVEL: 'warn' }, stdin);

const PASSWORD = 'pump-house-night-shift-47';

beforeAll(async () => {
  database = await createTestDatabase(work);
});

afterAll(async () => {
  await server?.stop();
  await database.drop();
  fs.rmSync(work, { recursive: true, force: true });
});

it('refuses a weak password, a missing password and a bad e-mail, creating nobody', async () => {
  const weak = await createAdmin(['--email', 'ops@example.org', '--name', 'Site admin'], 'short\n');
  expect(weak.code).toBe(1);
  expect(weak.err).toContain('password: at least 12 characters');
  const none = await createAdmin(['--email', 'ops@example.org', '--name', 'Site admin'], null);
  expect(none.code).toBe(1);
  expect(none.err).toContain('no password on standard input');
  const bad = await createAdmin(['--email', 'not-an-address', '--name', 'Site admin'], `${PASSWORD}\n`);
  expect(bad.code).toBe(1);
  expect(bad.err).toContain('--email needs an e-mail address');
}, 120_000);

it('creates the first administrator on an empty production database, who then signs in to a real server', async () => {
  const made = await createAdmin(['--email', 'Ops@Example.org', '--name', 'Site admin'], `${PASSWORD}\n`);
  expect(made).toMatchObject({ code: 0 });
  expect(made.out).toContain('administrator ops@example.org created');

  const again = await createAdmin(['--email', 'ops@example.org', '--name', 'Second'], `${PASSWORD}\n`);
  expect(again.code).toBe(1);
  expect(again.err).toContain('e-mail is already in use');

  server = await startServerProcess({ dataDir: path.join(work, 'server'), env: { DATABASE_URL: database.url } });
  const res = await fetch(`${server.url}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'ops@example.org', password: PASSWORD }),
  });
  expect(res.status).toBe(200);
  const body = (await res.json()) as { user: { role: string; name: string } };
  expect(body.user).toMatchObject({ role: 'admin', name: 'Site admin' });
}, 120_000);
