/**
 * End-to-end harness: a real server process (broker, HTTP, mail catcher) on free ports with its own
 * DATA_DIR, the demo seed, the real simulator, and Debian's Chromium driven by playwright-core.
 *
 * Every child runs in its own process group and is killed with it: on stop(), when startStack fails,
 * and when the test process exits or is interrupted, so no server or simulator outlives a run.
 * Logs stay in test-output/logs/<run>/ (named in every error); screenshots go to test-output/screenshots/.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';
import { freePort } from '../../scripts/free-port';
export { freePort };

const ROOT = path.resolve(__dirname, '../..');
export const SHOTS = path.join(ROOT, 'test-output/screenshots');
export const LOGS = path.join(ROOT, 'test-output/logs');

export const DEMO_PASSWORD = 'jacketwatch-demo';
export const ACCOUNTS = {
  admin: 'admin@jacketwatch.test',
  planner: 'planner@jacketwatch.test',
  technician: 'tech@jacketwatch.test',
  operator: 'operator@jacketwatch.test',
} as const;

export interface StackOptions {
  /** Extra simulator arguments, e.g. ['--scenario', 'overheat']. */
  simulatorArgs?: string[];
  /** Start the simulator at all (default true). */
  simulate?: boolean;
  env?: Record<string, string>;
  /** Skip the demo seed: an empty DATA_DIR (default false). */
  noSeed?: boolean;
}

export interface Stack {
  baseUrl: string;
  port: number;
  mqttPort: number;
  smtpPort: number;
  controlPort: number;
  dataDir: string;
  /** This run's logs: seed.log, server.log, simulator.log. */
  logDir: string;
  /** The seeded devices' credentials (DATA_DIR/demo-devices.json), as the simulator reads them. */
  devicesFile: string;
  /** POST to the simulator's control endpoint, e.g. control('/engines/1/stop'). */
  control(pathname: string, body?: unknown): Promise<unknown>;
  api<T = unknown>(method: string, pathname: string, token?: string, body?: unknown): Promise<{ status: number; body: T }>;
  login(email: string): Promise<string>;
  /** Start (another) simulator on this stack's control port; returns at once. */
  startSimulator(args: string[]): ChildProcess;
  /** Like startSimulator, but resolves when its control port answers (fails early with the log if it exits). */
  startSimulatorReady(args: string[]): Promise<ChildProcess>;
  /** Kill the server process group (SIGKILL, as a crash); the DATA_DIR and the ports stay for restartServer. */
  killServer(): Promise<void>;
  /** Start the server again on the same ports and DATA_DIR; resolves when /api/health answers. */
  restartServer(): Promise<void>;
  stop(): Promise<void>;
}

/** Every child still running and every DATA_DIR still there, for the exit handlers. */
const live = new Set<ChildProcess>();
const dataDirs = new Set<string>();

function removeDataDir(dir: string): void {
  dataDirs.delete(dir);
  if (!process.env.KEEP_E2E_DATA) fs.rmSync(dir, { recursive: true, force: true });
}

function killGroup(child: ChildProcess, signal: NodeJS.Signals): void {
  if (child.pid === undefined) return;
  try {
    process.kill(-child.pid, signal); // the child and anything it started
  } catch {
    try {
      child.kill(signal);
    } catch {
      /* already gone */
    }
  }
}

let handlersInstalled = false;
function installExitHandlers(): void {
  if (handlersInstalled) return;
  handlersInstalled = true;
  const killAll = () => {
    for (const c of live) killGroup(c, 'SIGKILL');
    for (const d of [...dataDirs]) removeDataDir(d);
  };
  process.once('exit', killAll);
  for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
    process.once(sig, () => {
      killAll();
      process.exit(128 + (os.constants.signals[sig] ?? 1));
    });
  }
}

/** A TypeScript entry point run by node with tsx's loader: one process per child, no wrapper to orphan. */
function run(script: string, args: string[], env: NodeJS.ProcessEnv, name: string, logDir: string): ChildProcess {
  installExitHandlers();
  const out = fs.openSync(path.join(logDir, `${name}.log`), 'a');
  const child = spawn(process.execPath, ['--import', 'tsx', script, ...args], { cwd: ROOT, env, stdio: ['ignore', out, out], detached: true });
  fs.closeSync(out);
  live.add(child);
  child.once('exit', () => live.delete(child));
  return child;
}

function exited(child: ChildProcess): boolean {
  return child.exitCode !== null || child.signalCode !== null;
}

/** The last lines of a log, for error messages. */
export function logTail(file: string, lines = 15): string {
  try {
    return fs.readFileSync(file, 'utf8').trimEnd().split('\n').slice(-lines).join('\n');
  } catch {
    return '(no log)';
  }
}

/** Poll until check() is true (exceptions count as "not yet"); `dies` fails at once if that child exits. */
export async function waitUntil(
  check: () => Promise<boolean> | boolean,
  opts: { timeoutMs: number; what: string; intervalMs?: number; dies?: { child: ChildProcess; log: string } },
): Promise<void> {
  const until = Date.now() + opts.timeoutMs;
  let lastError = '';
  for (;;) {
    if (opts.dies && exited(opts.dies.child)) {
      const how = opts.dies.child.exitCode !== null ? `exit code ${opts.dies.child.exitCode}` : `signal ${opts.dies.child.signalCode}`;
      throw new Error(`${opts.what}: the process ended (${how}) first; see ${opts.dies.log}\n${logTail(opts.dies.log)}`);
    }
    try {
      if (await check()) return;
    } catch (err) {
      lastError = (err as Error).message;
    }
    if (Date.now() >= until) {
      const log = opts.dies ? `; see ${opts.dies.log}\n${logTail(opts.dies.log)}` : '';
      throw new Error(`timed out after ${opts.timeoutMs} ms waiting for ${opts.what}${lastError ? ` (last error: ${lastError})` : ''}${log}`);
    }
    await new Promise((r) => setTimeout(r, opts.intervalMs ?? 250));
  }
}

async function stopChild(child: ChildProcess): Promise<void> {
  if (exited(child)) {
    killGroup(child, 'SIGKILL'); // leftovers of its group, if any
    return;
  }
  await new Promise<void>((resolve) => {
    const timer = setTimeout(() => killGroup(child, 'SIGKILL'), 10000);
    child.once('exit', () => {
      clearTimeout(timer);
      resolve();
    });
    killGroup(child, 'SIGTERM');
  });
}

export async function startStack(opts: StackOptions = {}): Promise<Stack> {
  const [port, mqttPort, smtpPort] = [await freePort(), await freePort(), await freePort()];
  // the simulator binds its control endpoint on a port it is given by the OS and says which in its log
  let controlPort = 0;
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-e2e-'));
  dataDirs.add(dataDir);
  const logDir = path.join(LOGS, path.basename(dataDir));
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
  const logOf = (name: string) => path.join(logDir, `${name}.log`);
  const stopAll = async () => {
    for (const child of children.slice().reverse()) await stopChild(child);
  };

  let simulatorLogFrom = 0;
  const startSimulator = (args: string[]) => {
    controlPort = 0;
    simulatorLogFrom = fs.existsSync(logOf('simulator')) ? fs.statSync(logOf('simulator')).size : 0;
    const sim = run('simulator/cli.ts', ['--control-port', '0', ...args], env, 'simulator', logDir);
    children.push(sim);
    return sim;
  };
  /** The control port this simulator start reported (0 until its log line is written). */
  const reportedControlPort = (): number => {
    const text = fs.readFileSync(logOf('simulator'), 'utf8').slice(simulatorLogFrom);
    const m = /control endpoint http:\/\/127\.0\.0\.1:(\d+)/.exec(text);
    return m ? Number(m[1]) : 0;
  };
  const startSimulatorReady = async (args: string[]) => {
    const sim = startSimulator(args);
    await waitUntil(
      async () => {
        controlPort = reportedControlPort();
        return controlPort > 0 && (await fetch(`http://127.0.0.1:${controlPort}/stats`)).ok;
      },
      { timeoutMs: 30000, what: 'the simulator control endpoint in its log, answering', dies: { child: sim, log: logOf('simulator') } },
    );
    return sim;
  };

  let server: ChildProcess | null = null;
  const launchServer = async () => {
    const child = run('server/main.ts', [], env, 'server', logDir);
    server = child;
    children.push(child);
    await waitUntil(async () => (await fetch(`${baseUrl}/api/health`)).ok, {
      timeoutMs: 60000,
      what: `server on ${baseUrl}`,
      dies: { child, log: logOf('server') },
    });
  };

  try {
    if (!opts.noSeed) {
      const seed = run('seeds/cli.ts', [], env, 'seed', logDir);
      children.push(seed);
      const code = await new Promise<number | null>((resolve) => seed.once('exit', (c) => resolve(c)));
      if (code !== 0) throw new Error(`demo seed exited with ${code}; see ${logOf('seed')}\n${logTail(logOf('seed'))}`);
    }

    await launchServer();

    if (opts.simulate !== false) await startSimulatorReady(opts.simulatorArgs ?? ['--rate', '1', '--speed', '30', '--seed', '7']);
  } catch (err) {
    await stopAll();
    removeDataDir(dataDir);
    (err as Error).message += `\n(logs of this run: ${logDir})`;
    throw err;
  }

  const api = async <T>(method: string, pathname: string, token?: string, body?: unknown) => {
    const res = await fetch(baseUrl + pathname, {
      method,
      headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await res.text();
    let parsed: unknown = null;
    try {
      parsed = text ? JSON.parse(text) : null;
    } catch {
      throw new Error(`${method} ${pathname}: ${res.status}, not JSON: ${text.slice(0, 200)}`);
    }
    return { status: res.status, body: parsed as T };
  };

  return {
    baseUrl,
    port,
    mqttPort,
    smtpPort,
    get controlPort() {
      return controlPort;
    },
    dataDir,
    logDir,
    devicesFile: path.join(dataDir, 'demo-devices.json'),
    api,
    startSimulator,
    startSimulatorReady,
    async control(pathname, body) {
      const res = await fetch(`http://127.0.0.1:${controlPort}${pathname}`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify(body ?? {}),
      });
      if (!res.ok) throw new Error(`simulator control ${pathname}: ${res.status} ${await res.text()}; see ${logOf('simulator')}`);
      return res.json();
    },
    async login(email) {
      const res = await api<{ token: string }>('POST', '/api/auth/login', undefined, { email, password: DEMO_PASSWORD });
      if (res.status !== 200) throw new Error(`login ${email}: ${res.status}`);
      return res.body.token;
    },
    async killServer() {
      const child = server;
      if (!child) return;
      server = null;
      if (exited(child)) return;
      await new Promise<void>((resolve) => {
        child.once('exit', () => resolve());
        killGroup(child, 'SIGKILL');
      });
      children.splice(children.indexOf(child), 1);
    },
    async restartServer() {
      if (server) throw new Error('restartServer: the server is still running');
      await launchServer();
    },
    async stop() {
      await stopAll();
      removeDataDir(dataDir);
    },
  };
}

export async function launchBrowser(): Promise<Browser> {
  const executablePath = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
  if (!fs.existsSync(executablePath)) throw new Error(`no Chromium at ${executablePath} (apt-get install -y chromium, or set CHROMIUM_PATH)`);
  return chromium.launch({
    executablePath,
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

/** A full-page screenshot in test-output/screenshots/<name>.png; returns the file. */
export async function shot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(SHOTS, { recursive: true });
  const file = path.join(SHOTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/**
 * The open Material dialog, once its opening animation has ended. Material moves the focus into the
 * dialog when the animation ends; on a busy machine that can be after a test started typing, and the
 * rest of the text then lands in the first field. Wait for it before filling anything.
 */
export async function openDialog(page: Page): Promise<Locator> {
  const dialog = page.locator('mat-dialog-container.mdc-dialog--open:not(.mdc-dialog--opening)').last();
  await dialog.waitFor({ timeout: 15000 });
  await page.waitForFunction(() => !!document.activeElement?.closest('mat-dialog-container'), null, { timeout: 15000 });
  return dialog;
}

/** Fill a field and check that the value stuck (a late focus move would have sent it elsewhere). */
export async function fillChecked(field: Locator, value: string): Promise<void> {
  for (let attempt = 0; attempt < 3; attempt++) {
    await field.fill(value);
    if ((await field.inputValue()) === value) return;
  }
  throw new Error(`the field did not keep the value "${value}"`);
}

/**
 * Choose an option of a Material select: opens its panel (again, if the first click came before the field was
 * ready) until the option is there, clicks it, and waits until the field shows it. `exact`: the whole name, not a part.
 */
export async function pickOption(page: Page, field: Locator, name: string | RegExp, opts: { exact?: boolean } = {}): Promise<void> {
  const option = page.getByRole('option', { name, exact: opts.exact }).first();
  const panel = page.getByRole('listbox');
  for (let attempt = 0; attempt < 4; attempt++) {
    if (!(await panel.isVisible())) await field.click();
    const shown = await option.waitFor({ timeout: 5000 }).then(
      () => true,
      () => false,
    );
    if (shown) {
      const text = ((await option.textContent()) ?? '').trim();
      await option.click();
      await waitUntil(async () => ((await field.textContent()) ?? '').includes(text), { timeoutMs: 10000, what: `the field to show "${text}"` });
      return;
    }
    if (await panel.isVisible()) await page.keyboard.press('Escape'); // closes the panel only
  }
  throw new Error(`no option ${String(name)} in the select`);
}
