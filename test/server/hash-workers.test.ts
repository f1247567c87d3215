import { spawn } from 'node:child_process';
import path from 'node:path';

/**
 * The bcrypt worker threads must never keep a process alive: a leaked ref held the jest run open after its
 * last test until CI's time ran out. A real process checks two secrets and must then exit by itself.
 */
const SCRIPT = `
const bcrypt = require('bcryptjs');
const { compareOffThread } = require(${JSON.stringify(path.resolve(__dirname, '../../server/auth/hash-workers'))});
(async () => {
  const hash = await bcrypt.hash('right', 4);
  const good = await compareOffThread('right', hash);
  const bad = await compareOffThread('wrong', hash);
  console.log(JSON.stringify({ good, bad }));
})();
`;

test('checks run off the main thread, give the right answers, and the process exits by itself', async () => {
  const child = spawn(process.execPath, ['--import', 'tsx', '-e', SCRIPT], {
    cwd: path.resolve(__dirname, '../..'),
    detached: true,
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  let out = '';
  child.stdout.on('data', (d: Buffer) => (out += d.toString()));
  const stopper = setTimeout(() => child.pid && process.kill(-child.pid, 'SIGKILL'), 30_000);
  const [code, signal] = await new Promise<[number | null, NodeJS.Signals | null]>((resolve) => child.on('close', (c, s) => resolve([c, s]))); // after stdout ends
  clearTimeout(stopper);
  expect(signal).toBeNull(); // not killed by the 30 s stopper: it ended on its own
  expect(code).toBe(0);
  expect(JSON.parse(out.trim())).toEqual({ good: true, bad: false });
}, 40_000);
