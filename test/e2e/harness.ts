/**
 * End-to-end harness: a real server process (broker, HTTP, mail catcher) on free ports with its own
 * DATA_DIR, the demo seed, the real simulator, and Debian's Chromium driven by playwright-core.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';

const ROOT = path.resolve(__dirname, '../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
export const SHOTS = path.join(ROOT, 'test-output/screenshots');

export const DEMO_PASSWORD = 'jacketwatch-demo';
export const ACCOUNTS = {
  admin: 'admin@jacketwatch.test',
  planner: 'planner@jacketwatch.test',
  technician: 'tech@jacketwatch.test',
  operator: 'operator@jacketwatch.test',
} as const;

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

export interface StackOptions {
  /** Extra simulator arguments, e.g. ['--scenario', 'overheat']. Empty array: no simulator. */
  simulatorArgs?: string[];
  /** Start the simulator at all (default true). */
  simulate?: boolean;
  env?: Record<string, string>;
}

export interface Stack {
  baseUrl: string;
  port: number;
  mqttPort: number;
  smtpPort: number;
  controlPort: number;
  dataDir: string;
  /** POST to the simulator's control endpoint, e.g. control('/engines/1/stop'). */
  control(pathname: string, body?: unknown): Promise<unknown>;
  api<T = unknown>(method: string, pathname: string, token?: string, body?: unknown): Promise<{ status: number; body: T }>;
  login(email: string): Promise<string>;
  startSimulator(args: string[]): ChildProcess;
  stop(): Promise<void>;
}

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv, name: string, logDir: string): ChildProcess {
  const out = fs.openSync(path.join(logDir, `${name}.log`), 'a');
  return spawn(cmd, args, { cwd: ROOT, env, stdio: ['ignore', out, out] });
}

async function waitFor(check: () => Promise<boolean>, timeoutMs: number, what: string): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    try {
      if (await check()) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`timed out waiting for ${what}`);
}

async function exitOf(child: ChildProcess, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  await new Promise<void>((resolve) => {
    const timer = setTimeout(() => child.kill('SIGKILL'), 10000);
    child.once('exit', () => {
      clearTimeout(timer);
      resolve();
    });
    child.kill(signal);
  });
}

export async function startStack(opts: StackOptions = {}): Promise<Stack> {
  const [port, mqttPort, smtpPort, controlPort] = [await freePort(), await freePort(), await freePort(), await freePort()];
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-e2e-'));
  const logDir = path.join(ROOT, 'test-output/logs', path.basename(dataDir));
  fs.mkdirSync(logDir, { recursive: true });
  const env = {
    ...process.env,
    PORT: String(port),
    MQTT_PORT: String(mqttPort),
    SMTP_PORT: String(smtpPort),
    DATA_DIR: dataDir,
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    ...opts.env,
  };
  const baseUrl = `http://127.0.0.1:${port}`;
  const children: ChildProcess[] = [];

  const seed = run(TSX, ['seeds/cli.ts'], env, 'seed', logDir);
  await new Promise<void>((resolve, reject) =>
    seed.once('exit', (code) => (code === 0 ? resolve() : reject(new Error(`seed exited ${code}; see ${logDir}/seed.log`)))),
  );

  const server = run(TSX, ['server/main.ts'], env, 'server', logDir);
  children.push(server);
  await waitFor(async () => (await fetch(`${baseUrl}/api/health`)).ok, 60000, `server on ${baseUrl}`);

  const startSimulator = (args: string[]) => {
    const sim = run(TSX, ['simulator/cli.ts', '--control-port', String(controlPort), ...args], env, 'simulator', logDir);
    children.push(sim);
    return sim;
  };
  if (opts.simulate !== false) {
    startSimulator(opts.simulatorArgs ?? ['--rate', '1', '--speed', '30', '--seed', '7']);
    await waitFor(async () => (await fetch(`http://127.0.0.1:${controlPort}/stats`)).ok, 30000, 'simulator control port');
  }

  const api = async <T>(method: string, pathname: string, token?: string, body?: unknown) => {
    const res = await fetch(baseUrl + pathname, {
      method,
      headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await res.text();
    return { status: res.status, body: (text ? JSON.parse(text) : null) as T };
  };

  return {
    baseUrl,
    port,
    mqttPort,
    smtpPort,
    controlPort,
    dataDir,
    api,
    startSimulator,
    async control(pathname, body) {
      const res = await fetch(`http://127.0.0.1:${controlPort}${pathname}`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify(body ?? {}),
      });
      if (!res.ok) throw new Error(`simulator control ${pathname}: ${res.status}`);
      return res.json();
    },
    async login(email) {
      const res = await api<{ token: string }>('POST', '/api/auth/login', undefined, { email, password: DEMO_PASSWORD });
      if (res.status !== 200) throw new Error(`login ${email}: ${res.status}`);
      return res.body.token;
    },
    async stop() {
      for (const child of children.reverse()) await exitOf(child);
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      '--disable-quic',
    ],
  });
}

export async function signIn(page: Page, stack: Stack, email: string): Promise<void> {
  await page.goto(`${stack.baseUrl}/sign-in`);
  await page.getByLabel(/e-?mail/i).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: /sign in/i }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'), { timeout: 20000 });
}

export async function shot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(SHOTS, { recursive: true });
  const file = path.join(SHOTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
