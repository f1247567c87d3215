/**
 * Several servers, one system (PostgreSQL only; CLUSTER=off turns it off): socket.io events pass between
 * the servers through the PostgreSQL adapter (LISTEN/NOTIFY, no other service), so a browser on any server
 * gets every alarm event once; every accepted reading is relayed to the other servers (a shared
 * subscription hands each MQTT message to one of them) so each keeps the whole fleet's live state and
 * pushes it to its own browsers; engine leases decide which server evaluates which engine's rules; and one
 * server at a time holds the Sparkplug B host role (host-role.ts).
 */
import { createAdapter } from '@socket.io/postgres-adapter';
import { Pool } from 'pg';
import type { Config } from '../config';
import type { Logger } from '../logger';
import { EngineLeases, type LeaseState } from './engine-leases';
import { HostRoleLease, type HostRoleState } from './host-role';

export interface Cluster {
  pool: Pool;
  adapter: ReturnType<typeof createAdapter>;
  /** True when this server evaluates the engine's rules (owns its lease). */
  owns(engineId: number): boolean;
  state(): LeaseState;
  /** Engines' partitions gained (after replay) or lost: the rule engine's hooks. */
  onGained(fn: (partitions: number[]) => Promise<void> | void): void;
  onLost(fn: (partitions: number[]) => void): void;
  /** The Sparkplug B Primary Host role: held by one server at a time; `fn` runs when this server takes or gives it up. */
  hostRole: { state(): HostRoleState; onChange(fn: (holder: boolean) => Promise<void> | void): void };
  /** Starts taking leases (after the rule engine has hooked on). */
  startLeases(): Promise<void>;
  close(): Promise<void>;
}

/** Several-server machinery: on with a PostgreSQL DATABASE_URL unless CLUSTER=off. */
export function clusterWanted(config: Pick<Config, 'databaseUrl' | 'cluster'>): boolean {
  return config.cluster && /^postgres(ql)?:/.test(config.databaseUrl);
}

export function createCluster(config: Pick<Config, 'databaseUrl'>, log: Logger): Cluster {
  const pool = new Pool({ connectionString: config.databaseUrl, max: 4, keepAlive: true, application_name: 'jacketwatch-push' });
  pool.on('error', (err) => log.warn(`live push between servers: ${err.message}`));
  const adapter = createAdapter(pool, { errorHandler: (err: Error) => log.warn(`live push between servers: ${err.message}`) });
  const gained: Array<(p: number[]) => Promise<void> | void> = [];
  const lost: Array<(p: number[]) => void> = [];
  const roleListeners: Array<(holder: boolean) => Promise<void> | void> = [];
  const hostRole = new HostRoleLease({
    databaseUrl: config.databaseUrl,
    log,
    onChange: async (holder) => {
      for (const fn of roleListeners) await fn(holder);
    },
  });
  const leases = new EngineLeases({
    databaseUrl: config.databaseUrl,
    log,
    onGained: async (p) => {
      for (const fn of gained) await fn(p);
    },
    onLost: (p) => {
      for (const fn of lost) fn(p);
    },
  });
  return {
    pool,
    adapter,
    owns: (id) => leases.owns(id),
    state: () => leases.state(),
    onGained: (fn) => void gained.push(fn),
    onLost: (fn) => void lost.push(fn),
    hostRole: { state: () => hostRole.state(), onChange: (fn) => void roleListeners.push(fn) },
    startLeases: async () => {
      await leases.start();
      await hostRole.start();
    },
    async close() {
      await hostRole.close();
      await leases.close();
      await pool.end().catch(() => undefined);
    },
  };
}
