/**
 * `npm test`: every part in turn (lint and import cycles, jest, the server tests again on PostgreSQL, two servers on
 * PostgreSQL and mosquitto, component tests, end-to-end),
 * each in its own process group, with its duration printed at the end; exits non-zero when any part failed.
 * A part that fails does not stop the others, so one run shows every failure.
 */
import { spawn } from 'node:child_process';

interface Part {
  name: string;
  script: string;
}

const PARTS: Part[] = [
  // first and fast: a lint error or an import cycle fails the run before the long parts
  { name: 'lint (ESLint, no warnings)', script: 'lint' },
  { name: 'import cycles (madge)', script: 'lint:cycles' },
  { name: 'formatting (Prettier check)', script: 'format:check' },
  { name: 'unit and server (jest)', script: 'test:unit' },
  { name: 'server on PostgreSQL (jest, throwaway cluster)', script: 'test:unit:pg' },
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

function run(script: string): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn('npm', ['run', '--silent', script], { stdio: 'inherit', detached: true });
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

async function main(): Promise<void> {
  const only = process.argv.slice(2);
  const results: { name: string; code: number; seconds: number }[] = [];
  for (const part of PARTS) {
    if (only.length && !only.includes(part.script)) continue;
    if (interrupted) break;
    const started = Date.now();
    const code = await run(part.script);
    results.push({ name: part.name, code, seconds: (Date.now() - started) / 1000 });
  }
  console.log('\nTest parts:');
  for (const r of results) console.log(`  ${r.code === 0 ? 'passed' : 'FAILED'}  ${r.seconds.toFixed(0).padStart(5)} s  ${r.name}`);
  const total = results.reduce((s, r) => s + r.seconds, 0);
  console.log(`  total ${total.toFixed(0)} s`);
  process.exitCode = interrupted || results.some((r) => r.code !== 0) ? 1 : 0;
}

void main();
