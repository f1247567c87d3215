/**
 * `npm test`: every part of the tests, in three lanes that run side by side (a lane's parts one after another):
 *
 * - the Angular build, then end-to-end in Chromium, then two servers on PostgreSQL and mosquitto;
 * - lint, import cycles and formatting, the server tests on SQLite (jest), on PostgreSQL (jest, throwaway cluster), components;
 * - the jest tests that mostly wait on the clock: the three-minute alarm scenarios and the seven days of history
 *   followed by a minute of live data (on SQLite, then that one on PostgreSQL too).
 *
 * The two long lanes each keep about half of a core busy (measured per file on a 2-core machine), so side by side
 * they fit two cores; the third barely uses the CPU. Each part runs in its own process group; its output goes to
 * its own log, printed whole when the part ends (side-by-side parts never mix their lines), and its duration is
 * printed at the end; the run exits non-zero when any part failed. A part that fails does not stop the others
 * (so one run shows every failure), except that the end-to-end tests are not run when the build failed.
 *
 *   tsx scripts/test-all.ts                    every part
 *   tsx scripts/test-all.ts lint test:unit     only the parts with these ids (lanes kept)
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import { createRequire } from 'node:module';
import os from 'node:os';
import path from 'node:path';
import { failureExcerpt } from './failure-excerpt';

interface Part {
  /** What `tsx scripts/test-all.ts <id> ...` selects; the npm script unless said otherwise. */
  id?: string;
  name: string;
  /** An npm script (with `args` after `--`), or else `command`: a program of node_modules/.bin and its arguments. */
  script?: string;
  args?: string[];
  command?: string[];
  /** Not run (and counted as failed) when the part before it in its lane failed. */
  needsPrevious?: boolean;
}

/** jest's own ignore list (jest.config.js): `--testPathIgnorePatterns` on the command line replaces it. */
const jestIgnored: string[] = createRequire(__filename)('../jest.config.js').testPathIgnorePatterns;
/** Long and mostly idle (waiting on the simulator's clock), so they run in a lane of their own. */
const WAITING = ['test/server/alarms-scenarios.test.ts', 'test/server/alarms-backfill.test.ts'];

const LANES: Part[][] = [
  [
    { id: 'test:e2e', name: 'app build for the end-to-end tests (ng build)', script: 'build' },
    { id: 'test:e2e', name: 'end-to-end (Chromium)', script: 'test:e2e:run', needsPrevious: true },
    { name: 'several servers (two processes, PostgreSQL, mosquitto)', script: 'test:scale' },
  ],
  [
    // first in their lane and fast: a lint error or an import cycle shows within a minute
    { name: 'lint (ESLint, no warnings)', script: 'lint' },
    { name: 'import cycles (madge)', script: 'lint:cycles' },
    { name: 'formatting (Prettier check)', script: 'format:check' },
    {
      name: 'unit and server on SQLite (jest), but the two waiting ones',
      script: 'test:unit',
      args: ['--testPathIgnorePatterns', ...jestIgnored, ...WAITING.map((f) => path.basename(f, '.test.ts'))],
    },
    // test:unit:pg leaves out the alarm scenarios (SQLite only by design)
    { name: 'server on PostgreSQL (jest, throwaway cluster), but the backfill', script: 'test:unit:pg', args: ['--testPathIgnorePatterns', 'alarms-backfill'] },
    // last, long after the build of the first lane (the two Angular builds share .angular/cache)
    { name: 'components (ng test)', script: 'test:components' },
  ],
  [
    { id: 'test:unit', name: 'alarm scenarios and backfill on SQLite (jest, mostly waiting on the clock)', script: 'test:unit', args: WAITING },
    {
      id: 'test:unit:pg',
      name: 'alarm backfill on PostgreSQL (jest, throwaway cluster)',
      command: ['tsx', 'scripts/with-postgres.ts', '--', 'jest', '--runInBand', 'test/server/alarms-backfill.test.ts'],
    },
  ],
];

/**
 * A part that runs longer than this is stopped (its whole process group) and counted as failed, so a hang
 * (say, a handle that keeps jest open after its last test) shows as a named failure, not as a run that never ends.
 */
const PART_LIMIT_S = Number(process.env.TEST_PART_LIMIT_S ?? 1800);

/** Set by SIGINT/SIGTERM: the running parts are stopped and no further part starts. */
let interrupted = false;
const running = new Set<ChildProcess>();

function signalGroup(child: ChildProcess, sig: NodeJS.Signals): void {
  try {
    if (child.pid) process.kill(-child.pid, sig);
  } catch {
    /* already gone */
  }
}

function onSignal(): void {
  interrupted = true;
  for (const child of running) signalGroup(child, 'SIGTERM');
}
process.on('SIGINT', onSignal);
process.on('SIGTERM', onSignal);

/** Runs a part in its own process group, its output into `logFile`; resolves with its exit code. */
function run(part: Part, logFile: string): Promise<number> {
  return new Promise((resolve) => {
    const out = fs.openSync(logFile, 'w');
    const [program, ...args] = part.command ?? ['npm', 'run', '--silent', part.script!, ...(part.args?.length ? ['--', ...part.args] : [])];
    const env = { ...process.env, PATH: `${path.resolve('node_modules/.bin')}${path.delimiter}${process.env.PATH ?? ''}` };
    const child = spawn(program, args, { stdio: ['ignore', out, out], detached: true, env });
    fs.closeSync(out);
    running.add(child);
    let overTime = false;
    let hardStop: NodeJS.Timeout | undefined;
    const limit = setTimeout(() => {
      overTime = true;
      fs.appendFileSync(logFile, `\n${part.name}: still running after ${PART_LIMIT_S} s; stopped and counted as failed\n`);
      // SIGTERM first so a part's own helpers (a throwaway database, brokers) stop their groups; then SIGKILL
      signalGroup(child, 'SIGTERM');
      hardStop = setTimeout(() => signalGroup(child, 'SIGKILL'), 20_000);
    }, PART_LIMIT_S * 1000);
    child.on('error', (err) => fs.appendFileSync(logFile, `\ncould not start ${program}: ${err.message}\n`));
    child.on('close', (code, signal) => {
      running.delete(child);
      clearTimeout(limit);
      if (!overTime) clearTimeout(hardStop); // after an overrun, whatever ignored SIGTERM still gets SIGKILL
      if (overTime) return resolve(1);
      resolve(code ?? (signal ? 1 : 0));
    });
  });
}

type Result = { name: string; code: number; seconds: number; skipped?: boolean; log?: string };

const since = (t: number) => `${((Date.now() - t) / 1000).toFixed(0)} s`;

/** Runs a lane's parts in turn; each part's log is printed whole when it ends. */
async function runLane(parts: Part[], dir: string, started: number): Promise<Result[]> {
  const results: Result[] = [];
  for (const part of parts) {
    if (interrupted) break;
    const before = results.at(-1);
    if (part.needsPrevious && before && before.code !== 0) {
      console.log(`\n[${since(started)}] not run: ${part.name} (${before.name} failed)`);
      results.push({ name: part.name, code: 1, seconds: 0, skipped: true });
      continue;
    }
    console.log(`[${since(started)}] started: ${part.name}`);
    const t = Date.now();
    const logFile = path.join(dir, `${part.id ?? part.script}-${results.length}-${Math.random().toString(36).slice(2)}.log`);
    const code = await run(part, logFile);
    const seconds = (Date.now() - t) / 1000;
    process.stdout.write(`\n----- ${part.name} -----\n`);
    const log = fs.readFileSync(logFile, 'utf8');
    process.stdout.write(log);
    process.stdout.write(`----- end of ${part.name}: ${code === 0 ? 'passed' : 'FAILED'} in ${seconds.toFixed(0)} s [${since(started)}] -----\n\n`);
    results.push({ name: part.name, code, seconds, log: code === 0 ? undefined : log });
  }
  return results;
}

async function main(): Promise<void> {
  const only = process.argv.slice(2);
  const lanes = LANES.map((lane) => lane.filter((p) => !only.length || only.includes((p.id ?? p.script)!))).filter((lane) => lane.length);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-test-parts-'));
  const started = Date.now();
  const results = (await Promise.all(lanes.map((lane) => runLane(lane, dir, started)))).flat();
  fs.rmSync(dir, { recursive: true, force: true });
  for (const r of results.filter((x) => x.log !== undefined)) {
    console.log(`\nWhy "${r.name}" failed (from its log above, shortened):`);
    for (const line of failureExcerpt(r.log!)) console.log(`  | ${line}`);
  }
  console.log('\nTest parts:');
  for (const r of results) console.log(`  ${r.skipped ? 'NOT RUN' : r.code === 0 ? 'passed ' : 'FAILED '}  ${r.seconds.toFixed(0).padStart(5)} s  ${r.name}`);
  console.log(`  total ${since(started)} (wall clock; three lanes side by side)`);
  process.exitCode = interrupted || results.some((r) => r.code !== 0) ? 1 : 0;
}

void main();
