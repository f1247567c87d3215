import { spawn } from 'node:child_process';
import path from 'node:path';

const ROOT = path.resolve(__dirname, '../../..');

export interface NpmRun {
  code: number | null;
  out: string;
  err: string;
}

/**
 * `npm run -s <script> -- args` as its own process in the project folder, as an operator types it: `env` on top of
 * this process's environment, `stdin` written and closed (nothing when null). Resolves with the exit code and output.
 */
export function npmRun(script: string, args: string[], env: NodeJS.ProcessEnv, stdin: string | null = null): Promise<NpmRun> {
  return new Promise((resolve) => {
    const child = spawn('npm', ['run', '-s', script, '--', ...args], { cwd: ROOT, env: { ...process.env, ...env }, stdio: ['pipe', 'pipe', 'pipe'] });
    let out = '';
    let err = '';
    child.stdout.on('data', (d) => (out += d));
    child.stderr.on('data', (d) => (err += d));
    child.once('close', (code) => resolve({ code, out, err })); // 'close': after the output streams end, unlike 'exit'
    if (stdin !== null) child.stdin.write(stdin);
    child.stdin.end();
  });
}
