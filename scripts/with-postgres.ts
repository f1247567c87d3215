/**
 * Runs a command beside a throwaway PostgreSQL cluster: initdb into a temporary folder, the server on a free
 * loopback port in its own process group, the command with JW_TEST_PG_URL (a superuser URL of the cluster's
 * `postgres` database) in its environment; then the cluster is stopped by its group id and its folder removed.
 *
 *   tsx scripts/with-postgres.ts -- npx jest --runInBand test/server
 *
 * Debian's postgresql package provides the binaries (/usr/lib/postgresql/<version>/bin). As root, the
 * cluster runs as the `postgres` system user the package creates (PostgreSQL refuses to run as root).
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { freePort } from './free-port';

function pgBinDir(): string {
  if (process.env.PG_BIN) return process.env.PG_BIN;
  const root = '/usr/lib/postgresql';
  const versions = fs.existsSync(root)
    ? fs
        .readdirSync(root)
        .filter((v) => /^\d+$/.test(v))
        .sort((a, b) => Number(b) - Number(a))
    : [];
  if (!versions.length) throw new Error('PostgreSQL is not installed (apt-get install -y postgresql, or set PG_BIN)');
  return path.join(root, versions[0], 'bin');
}

const asRoot = process.getuid?.() === 0;
/** argv to run a PostgreSQL binary as the cluster's owner. */
const asOwner = (bin: string, args: string[]): [string, string[]] => (asRoot ? ['runuser', ['-u', 'postgres', '--', bin, ...args]] : [bin, args]);

function killGroup(child: ChildProcess, signal: NodeJS.Signals): void {
  if (!child.pid) return;
  try {
    process.kill(-child.pid, signal);
  } catch {
    /* already gone */
  }
}

async function waitForPort(port: number, server: ChildProcess, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`postgres exited with ${server.exitCode}`);
    const ok = await new Promise<boolean>((resolve) => {
      const s = net.connect(port, '127.0.0.1', () => {
        s.end();
        resolve(true);
      });
      s.on('error', () => resolve(false));
    });
    if (ok) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`postgres did not listen on ${port} within ${timeoutMs} ms`);
}

export interface PgCluster {
  url: string;
  stop(): Promise<void>;
}

/** Starts a throwaway cluster; stop() ends it and removes its folder. */
export async function startPgCluster(): Promise<PgCluster> {
  const bin = pgBinDir();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-pg-'));
  const data = path.join(dir, 'data');
  if (asRoot) execFileSync('chown', ['-R', 'postgres:postgres', dir]);
  const [initCmd, initArgs] = asOwner(path.join(bin, 'initdb'), ['-D', data, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--no-sync', '--locale=C']);
  execFileSync(initCmd, initArgs, { stdio: 'ignore' });
  const port = await freePort();
  const [cmd, args] = asOwner(path.join(bin, 'postgres'), [
    '-D',
    data,
    '-p',
    String(port),
    '-k',
    dir,
    '-c',
    'listen_addresses=127.0.0.1',
    // a test cluster: durability off for speed (the product's own durability is tested on SQLite and by the crash tests)
    '-c',
    'fsync=off',
    '-c',
    'synchronous_commit=off',
    '-c',
    'full_page_writes=off',
    '-c',
    'max_connections=300',
  ]);
  const log = fs.openSync(path.join(dir, 'postgres.log'), 'a');
  const server = spawn(cmd, args, { detached: true, stdio: ['ignore', log, log] });
  const stop = async () => {
    if (server.exitCode === null) {
      const exited = new Promise((r) => server.once('exit', r));
      killGroup(server, 'SIGTERM');
      const timer = setTimeout(() => killGroup(server, 'SIGKILL'), 10_000);
      await exited;
      clearTimeout(timer);
    }
    fs.rmSync(dir, { recursive: true, force: true });
  };
  try {
    await waitForPort(port, server, 30_000);
  } catch (err) {
    process.stderr.write(fs.readFileSync(path.join(dir, 'postgres.log'), 'utf8'));
    await stop();
    throw err;
  }
  return { url: `postgres://postgres@127.0.0.1:${port}/postgres`, stop };
}

async function main(): Promise<void> {
  const sep = process.argv.indexOf('--');
  const command = sep >= 0 ? process.argv.slice(sep + 1) : [];
  if (!command.length) throw new Error('usage: tsx scripts/with-postgres.ts -- COMMAND [ARGS...]');
  const cluster = await startPgCluster();
  console.log(`PostgreSQL test cluster at ${cluster.url}`);
  const child = spawn(command[0], command.slice(1), { stdio: 'inherit', detached: true, env: { ...process.env, JW_TEST_PG_URL: cluster.url } });
  const forward = () => killGroup(child, 'SIGTERM');
  process.on('SIGINT', forward);
  process.on('SIGTERM', forward);
  const code = await new Promise<number>((resolve) => child.on('exit', (c, s) => resolve(c ?? (s ? 1 : 0))));
  await cluster.stop();
  process.exitCode = code;
}

if (require.main === module) {
  main().catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exitCode = 1;
  });
}
