/**
 * `npm test`: every part in turn (lint and import cycles, jest, the server tests again on PostgreSQL beside it, two
 * servers on PostgreSQL and mosquitto, component tests, end-to-end),
 * each in its own process group, with its duration printed at the end; exits non-zero when any part failed.
 * A part that fails does not stop the others, so one run shows every failure.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

interface Part {
  name: string;
  script: string;
  /**
   * Runs at the same time as the part before it (both are mostly waiting on processes they started), its output
   * kept aside and printed whole when it ends, so the two logs do not mix.
   */
  withPrevious?: boolean;
}

const PARTS: Part[] = [
  // first and fast: a lint error or an import cycle fails the run before the long parts
  { name: 'lint (ESLint, no warnings)', script: 'lint' },
  { name: 'import cycles (madge)', script: 'lint:cycles' },
  { name: 'formatting (Prettier check)', script: 'format:check' },
  { name: 'unit and server (jest)', script: 'test:unit' },
  { name: 'server on PostgreSQL (jest, throwaway cluster)', script: 'test:unit:pg', withPrevious: true },
  { name: 'several servers (two processes, PostgreSQL, mosquitto)', script: 'test:scale' },
  { name: 'components (ng test)', script: 'test:components' },
  { name: 'end-to-end (Chromium)', script: 'test:e2e' },
];

/**
 * A part that runs longer than this is stopped (its whole process group) and counted as failed, so a hang
 * (say, a handle that keeps jest open after its last test) shows as a named failure, not as a run that never ends.
 */
const PART_LIMIT_S = Number(process.env.TEST_PART_LIMIT_S ?? 1800);

/** Set by SIGINT/SIGTERM: the running part is stopped and no further part starts. */
let interrupted = false;

function run(script: string, logFile?: string): Promise<number> {
  return new Promise((resolve) => {
    const out = logFile ? fs.openSync(logFile, 'w') : null;
    const child = spawn('npm', ['run', '--silent', script], { stdio: out === null ? 'inherit' : ['ignore', out, out], detached: true });
    if (out !== null) fs.closeSync(out);
    const stop = () => {
      interrupted = true;
      if (child.pid) {
        try {
          process.kill(-child.pid, 'SIGTERM');
        } catch {
          /* already gone */
        }
      }
    };
    process.once('SIGINT', stop);
    process.once('SIGTERM', stop);
    let overTime = false;
    const signalGroup = (sig: NodeJS.Signals) => {
      try {
        if (child.pid) process.kill(-child.pid, sig);
      } catch {
        /* already gone */
      }
    };
    let hardStop: NodeJS.Timeout | undefined;
    const limit = setTimeout(() => {
      overTime = true;
      console.error(`\n${script}: still running after ${PART_LIMIT_S} s; stopped and counted as failed`);
      // SIGTERM first so a part's own helpers (a throwaway database, brokers) stop their groups; then SIGKILL
      signalGroup('SIGTERM');
      hardStop = setTimeout(() => signalGroup('SIGKILL'), 20_000);
    }, PART_LIMIT_S * 1000);
    child.on('exit', (code, signal) => {
      clearTimeout(limit);
      if (!overTime) clearTimeout(hardStop); // after an overrun, whatever ignored SIGTERM still gets SIGKILL
      process.off('SIGINT', stop);
      process.off('SIGTERM', stop);
      if (overTime) return resolve(1);
      resolve(code ?? (signal ? 1 : 0));
    });
  });
}

type Result = { name: string; code: number; seconds: number };

/** Runs a part; with `aside`, its output goes to a file that is printed when the part ends. */
async function timed(part: Part, aside: boolean): Promise<Result> {
  const started = Date.now();
  const logFile = aside ? path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'jw-test-part-')), 'output.log') : undefined;
  const code = await run(part.script, logFile);
  const seconds = (Date.now() - started) / 1000;
  if (logFile) {
    process.stdout.write(`\n----- ${part.name} (ran alongside the part before it) -----\n`);
    process.stdout.write(fs.readFileSync(logFile));
    process.stdout.write(`----- end of ${part.name} -----\n`);
    fs.rmSync(path.dirname(logFile), { recursive: true, force: true });
  }
  return { name: part.name, code, seconds };
}

async function main(): Promise<void> {
  const only = process.argv.slice(2);
  const parts = PARTS.filter((p) => !only.length || only.includes(p.script));
  const results: Result[] = [];
  const started = Date.now();
  for (let i = 0; i < parts.length; i++) {
    if (interrupted) break;
    const alongside = parts[i + 1]?.withPrevious ? parts[i + 1] : null;
    const pair = [timed(parts[i], false), ...(alongside ? [timed(alongside, true)] : [])];
    results.push(...(await Promise.all(pair)));
    if (alongside) i++;
  }
  console.log('\nTest parts:');
  for (const r of results) console.log(`  ${r.code === 0 ? 'passed' : 'FAILED'}  ${r.seconds.toFixed(0).padStart(5)} s  ${r.name}`);
  console.log(`  total ${((Date.now() - started) / 1000).toFixed(0)} s (wall clock; some parts ran side by side)`);
  process.exitCode = interrupted || results.some((r) => r.code !== 0) ? 1 : 0;
}

void main();
