/**
 * Child processes of the tests, each in its own process group: stopped by the group id, so tsx's worker
 * (the real server or simulator under the wrapper) goes with it and nothing outlives a test.
 */
import { spawn, type ChildProcess, type SpawnOptions } from 'node:child_process';

export function spawnInGroup(command: string, args: string[], options: SpawnOptions = {}): ChildProcess {
  return spawn(command, args, { ...options, detached: true });
}

function signalGroup(child: ChildProcess, signal: NodeJS.Signals): void {
  if (!child.pid) return;
  try {
    process.kill(-child.pid, signal);
  } catch {
    /* the group is gone */
  }
}

/** SIGTERM to the group, SIGKILL after `graceMs`; resolves when the group leader has exited. */
export function stopGroup(child: ChildProcess | null, graceMs = 10_000): Promise<void> {
  return new Promise<void>((resolve) => {
    if (!child || child.exitCode !== null || child.signalCode !== null) {
      if (child) signalGroup(child, 'SIGKILL'); // a worker the leader left behind
      return resolve();
    }
    child.once('exit', () => {
      signalGroup(child, 'SIGKILL');
      resolve();
    });
    signalGroup(child, 'SIGTERM');
    setTimeout(() => signalGroup(child, 'SIGKILL'), graceMs).unref();
  });
}
