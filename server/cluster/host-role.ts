/**
 * Several servers on one PostgreSQL: which server is the Sparkplug B Primary Host Application. Exactly one
 * server at a time holds the role: the one holding a dedicated session-level advisory lock on its own
 * connection. The others try for it every round (a second). A holder that dies (even SIGKILL) loses its
 * connection, PostgreSQL releases the lock at once, and another server takes the role on its next round.
 * A holder checks its connection every round; when the check fails it gives the role up at once (it no
 * longer knows whether another server has it) and reconnects. The broker fences as well: every holder
 * uses one MQTT client id for the role, so a second connection with it ends the first.
 */
import { Client } from 'pg';
import type { Logger } from '../logger';

/** First key of the advisory lock (0x4a57000N: the other keys are in engine-leases.ts and migration-lock.ts). */
const HOST_ROLE_LOCK = 0x4a570004;

export interface HostRoleState {
  holder: boolean;
  /** When this server took the role (ISO), null while it does not hold it. */
  since: string | null;
  lastError: string | null;
}

export interface HostRoleOptions {
  databaseUrl: string;
  log: Logger;
  roundMs?: number;
  /** Role taken; lost: given up (connection lost, or closing). Awaited, one at a time. */
  onChange(holder: boolean): Promise<void> | void;
}

export class HostRoleLease {
  private client: Client | null = null;
  private holder = false;
  private since: string | null = null;
  private lastError: string | null = null;
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<void> | null = null;
  private closed = false;
  private readonly roundMs: number;

  constructor(private readonly opts: HostRoleOptions) {
    this.roundMs = opts.roundMs ?? 1000;
  }

  async start(): Promise<void> {
    await this.round();
    this.timer = setInterval(() => void this.round(), this.roundMs);
    this.timer.unref();
  }

  holds(): boolean {
    return this.holder;
  }

  state(): HostRoleState {
    return { holder: this.holder, since: this.since, lastError: this.lastError };
  }

  private round(): Promise<void> {
    if (this.running || this.closed) return this.running ?? Promise.resolve();
    this.running = this.step()
      .catch(async (err: unknown) => {
        this.lastError = err instanceof Error ? err.message : String(err);
        this.opts.log.warn(`sparkplug host role: ${this.lastError}`);
        await this.drop();
      })
      .finally(() => {
        this.running = null;
      });
    return this.running;
  }

  private async step(): Promise<void> {
    if (!this.client) {
      const client = new Client({
        connectionString: this.opts.databaseUrl,
        keepAlive: true,
        keepAliveInitialDelayMillis: 5000,
        application_name: 'jacketwatch-sparkplug-host',
      });
      client.on('error', (err) => {
        this.lastError = err.message;
        if (this.client === client) void this.round();
      });
      await client.connect();
      this.client = client;
      this.lastError = null;
    }
    if (this.holder) {
      await this.client.query('SELECT 1'); // still ours while this session lives
      return;
    }
    const r = await this.client.query<{ ok: boolean }>('SELECT pg_try_advisory_lock($1::int, 0) AS ok', [HOST_ROLE_LOCK]);
    if (!r.rows[0].ok) return;
    this.holder = true;
    this.since = new Date().toISOString();
    this.opts.log.info('sparkplug host role: taken (this server is the Primary Host Application)');
    await this.opts.onChange(true);
  }

  /** Without the connection the lock may be another server's: the role ends here at once. */
  private async drop(): Promise<void> {
    const client = this.client;
    this.client = null;
    if (client) void client.end().catch(() => undefined);
    await this.giveUp();
  }

  private async giveUp(): Promise<void> {
    if (!this.holder) return;
    this.holder = false;
    this.since = null;
    this.opts.log.warn('sparkplug host role: given up');
    await Promise.resolve(this.opts.onChange(false)).catch((err: unknown) => this.opts.log.warn('sparkplug host role: stopping the host failed', err));
  }

  /** Gives the role up (the host says offline first) and closes the connection, which releases the lock. */
  async close(): Promise<void> {
    this.closed = true;
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.running;
    await this.giveUp();
    const client = this.client;
    this.client = null;
    if (client) await client.end().catch(() => undefined);
  }
}
