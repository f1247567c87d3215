import { Worker } from 'node:worker_threads';
import bcrypt from 'bcryptjs';

/**
 * bcrypt checks on worker threads. bcryptjs is pure JavaScript: on the main thread each check holds the
 * event loop for about 100 ms, so under a flood of wrong passwords a good sign-in's request, its database
 * lookup and every other request waited for loop turns between hashes (measured: a good sign-in took
 * 6.8 s under 200 wrong sign-ins and 300 wrong MQTT logins). Here the loop stays free; the hash gate still
 * bounds how many checks run at once (one worker per slot).
 */
// plain CommonJS, evaluated in the worker: no TypeScript loader is needed there
const WORKER_SOURCE = `
const { parentPort } = require('node:worker_threads');
const bcrypt = require('bcryptjs');
parentPort.on('message', (m) => {
  let ok = false;
  try { ok = bcrypt.compareSync(m.plain, m.hash); } catch { ok = false; }
  parentPort.postMessage({ id: m.id, ok });
});
`;

interface Pending {
  resolve(ok: boolean): void;
  plain: string;
  hash: string;
}

class HashWorker {
  private worker: Worker | null = null;
  private readonly pending = new Map<number, Pending>();
  private nextId = 1;

  compare(plain: string, hash: string): Promise<boolean> {
    return new Promise<boolean>((resolve) => {
      const id = this.nextId++;
      this.pending.set(id, { resolve, plain, hash });
      try {
        const w = this.ensure();
        w.ref(); // a check under way keeps the process alive until its answer comes
        w.postMessage({ id, plain, hash });
      } catch {
        this.failAll();
      }
    });
  }

  private ensure(): Worker {
    if (this.worker) return this.worker;
    const w = new Worker(WORKER_SOURCE, { eval: true });
    w.on('message', (m: { id: number; ok: boolean }) => {
      const p = this.pending.get(m.id);
      this.pending.delete(m.id);
      p?.resolve(m.ok === true);
      if (this.pending.size === 0) w.unref();
    });
    // a worker that died: its checks are done here instead, and the next check starts a new worker
    w.on('error', () => this.failAll());
    w.on('exit', () => this.failAll());
    // an idle worker never keeps the process alive; unref after the listeners, since adding a 'message'
    // listener refs the worker again (a leaked ref held a jest run open after its last test)
    w.unref();
    this.worker = w;
    return w;
  }

  private failAll(): void {
    this.worker = null;
    const left = [...this.pending.values()];
    this.pending.clear();
    for (const p of left) bcrypt.compare(p.plain, p.hash).then(p.resolve, () => p.resolve(false));
  }
}

const workers = [new HashWorker(), new HashWorker()];
let turn = 0;

/** bcrypt.compare off the main thread (round-robin over two workers, as the hash gate runs two at once). */
export function compareOffThread(plain: string, hash: string): Promise<boolean> {
  turn = (turn + 1) % workers.length;
  return workers[turn].compare(plain, hash);
}
