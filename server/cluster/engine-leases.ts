/**
 * Several servers on one PostgreSQL: which server evaluates which engine's rules. Engines fall into
 * LEASE_PARTITIONS partitions (engine id modulo the count); a server owns a partition while it holds that
 * partition's session-level advisory lock on its own connection. Each server also holds a member lock, so
 * the live servers can be counted from pg_locks; each aims at an equal share and gives up the surplus
 * when another joins. A server that dies (even SIGKILL) loses its connection, PostgreSQL releases its
 * locks at once, and the others take its partitions on their next round (every second). A server that
 * loses its own connection stops evaluating at once (it no longer knows who owns what) and reconnects.
 */
import { Client } from 'pg';
import type { Logger } from '../logger';

export const LEASE_PARTITIONS = 64;
/** First key of the advisory locks (the second is the partition or member number). Arbitrary, fixed. */
const PARTITION_LOCK = 0x4a570001;
const MEMBER_LOCK = 0x4a570002;

export const partitionOf = (engineId: number): number => engineId % LEASE_PARTITIONS;

export interface LeaseState {
  connected: boolean;
  /** Servers holding a member lock on this database (this one included while connected). */
  members: number;
  /** Partitions this server owns, of LEASE_PARTITIONS (engine id modulo LEASE_PARTITIONS), and which. */
  owned: number;
  ownedPartitions: number[];
  partitions: number;
  lastError: string | null;
}

export interface EngineLeasesOptions {
  databaseUrl: string;
  log: Logger;
  /** Between rounds; also the longest a dead server's engines wait for a new owner (plus one round). */
  roundMs?: number;
  /** Partitions gained (evaluation starts) and lost (evaluation stops before the lock is given up). */
  onGained(partitions: number[]): Promise<void> | void;
  onLost(partitions: number[]): void;
}

export class EngineLeases {
  private client: Client | null = null;
  private readonly owned = new Set<number>();
  private members = 0;
  private memberId = 0;
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<void> | null = null;
  private closed = false;
  private lastError: string | null = null;
  private readonly roundMs: number;

  constructor(private readonly opts: EngineLeasesOptions) {
    this.roundMs = opts.roundMs ?? 1000;
  }

  /** First round done: this server owns its share (all partitions when it is alone). */
  async start(): Promise<void> {
    await this.round();
    this.timer = setInterval(() => void this.round(), this.roundMs);
    this.timer.unref();
  }

  owns(engineId: number): boolean {
    return this.owned.has(partitionOf(engineId));
  }

  ownedPartitions(): number[] {
    return [...this.owned].sort((a, b) => a - b);
  }

  state(): LeaseState {
    return {
      connected: this.client !== null,
      members: this.members,
      owned: this.owned.size,
      ownedPartitions: this.ownedPartitions(),
      partitions: LEASE_PARTITIONS,
      lastError: this.lastError,
    };
  }

  private round(): Promise<void> {
    if (this.running || this.closed) return this.running ?? Promise.resolve();
    this.running = this.balance()
      .catch((err: unknown) => {
        this.lastError = err instanceof Error ? err.message : String(err);
        this.opts.log.warn(`engine leases: ${this.lastError}`);
        this.dropConnection();
      })
      .finally(() => {
        this.running = null;
      });
    return this.running;
  }

  private async connect(): Promise<Client> {
    if (this.client) return this.client;
    // keepalives: a server on another machine that vanishes without closing its connection is noticed
    const client = new Client({
      connectionString: this.opts.databaseUrl,
      keepAlive: true,
      keepAliveInitialDelayMillis: 5000,
      application_name: 'jacketwatch-leases',
    });
    client.on('error', (err) => {
      this.lastError = err.message;
      this.opts.log.warn(`engine leases: connection lost (${err.message})`);
      if (this.client === client) this.dropConnection();
    });
    await client.connect();
    for (;;) {
      const id = 1 + Math.floor(Math.random() * 0x7ffffffe);
      const r = await client.query<{ ok: boolean }>('SELECT pg_try_advisory_lock($1::int, $2::int) AS ok', [MEMBER_LOCK, id]);
      if (r.rows[0].ok) {
        this.memberId = id;
        break;
      }
    }
    this.client = client;
    this.lastError = null;
    return client;
  }

  /** Without a connection this server owns nothing: evaluation stops at once. */
  private dropConnection(): void {
    const client = this.client;
    this.client = null;
    this.members = 0;
    if (this.owned.size) {
      const lost = this.ownedPartitions();
      this.owned.clear();
      this.opts.onLost(lost);
    }
    if (client) void client.end().catch(() => undefined);
  }

  private async balance(): Promise<void> {
    const client = await this.connect();
    const m = await client.query<{ n: string }>(
      `SELECT count(*) AS n FROM pg_locks
        WHERE locktype = 'advisory' AND classid = $1::int::oid AND objsubid = 2 AND granted
          AND database = (SELECT oid FROM pg_database WHERE datname = current_database())`,
      [MEMBER_LOCK],
    );
    this.members = Math.max(1, Number(m.rows[0].n));
    const target = Math.ceil(LEASE_PARTITIONS / this.members);
    if (this.owned.size > target) {
      const give = this.ownedPartitions().slice(target);
      for (const p of give) this.owned.delete(p);
      this.opts.onLost(give); // evaluation of these stops before another server can take them
      for (const p of give) await client.query('SELECT pg_advisory_unlock($1::int, $2::int)', [PARTITION_LOCK, p]);
      this.opts.log.info(`engine leases: gave up ${give.length} partition(s) (${this.members} servers)`);
      return;
    }
    if (this.owned.size === target) return;
    const gained: number[] = [];
    // start at a place of our own, so servers joining together try different partitions first
    const start = this.memberId % LEASE_PARTITIONS;
    for (let i = 0; i < LEASE_PARTITIONS && this.owned.size < target; i++) {
      const p = (start + i) % LEASE_PARTITIONS;
      if (this.owned.has(p)) continue;
      const r = await client.query<{ ok: boolean }>('SELECT pg_try_advisory_lock($1::int, $2::int) AS ok', [PARTITION_LOCK, p]);
      if (r.rows[0].ok) {
        this.owned.add(p);
        gained.push(p);
      }
    }
    if (gained.length) {
      this.opts.log.info(`engine leases: took ${gained.length} partition(s), own ${this.owned.size} of ${LEASE_PARTITIONS} (${this.members} servers)`);
      await this.opts.onGained(gained.sort((a, b) => a - b));
    }
  }

  /** Gives up every partition (evaluation stops) and closes the connection. */
  async close(): Promise<void> {
    this.closed = true;
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.running;
    const lost = this.ownedPartitions();
    this.owned.clear();
    if (lost.length) this.opts.onLost(lost);
    const client = this.client;
    this.client = null;
    if (client) await client.end().catch(() => undefined);
  }
}
