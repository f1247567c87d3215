/**
 * Engine leases (server/cluster/engine-leases.ts) on a real PostgreSQL database: two holders split the 64
 * partitions evenly and never own the same one; when one closes, the other takes everything; a holder whose
 * connection the database cuts (as when its process dies) stops owning at once and comes back for its share.
 * The Sparkplug host role (server/cluster/host-role.ts): one holder of two; a cut connection moves it. PostgreSQL
 * by nature (advisory locks): skipped on SQLite. The readings
 * relay's message format is checked on both.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { EngineLeases, LEASE_PARTITIONS, partitionOf } from '../../server/cluster/engine-leases';
import { HostRoleLease } from '../../server/cluster/host-role';
import { decode } from '../../server/cluster/reading-relay';
import { createLogger } from '../../server/logger';
import { Client, createTestDatabase, isPg, type TestDatabase } from './support/test-db';
import { until } from './support/until';

jest.setTimeout(60_000);
const pgOnly = isPg ? it : it.skip; // advisory locks are PostgreSQL's
const holds = (what: string, cond: () => boolean) => until(what, async () => cond(), Boolean);

const log = createLogger('error');
let db: TestDatabase | null = null;
let dir = '';
const holders: Array<EngineLeases | HostRoleLease> = [];

interface Holder {
  leases: EngineLeases;
  gained: number[];
  lost: number[];
}

function holder(url: string): Holder {
  const h: Holder = { leases: null as unknown as EngineLeases, gained: [], lost: [] };
  h.leases = new EngineLeases({ databaseUrl: url, log, roundMs: 100, onGained: (p) => void h.gained.push(...p), onLost: (p) => void h.lost.push(...p) });
  holders.push(h.leases);
  return h;
}

beforeAll(async () => {
  if (!isPg) return;
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-leases-'));
  db = await createTestDatabase(dir);
});

afterAll(async () => {
  for (const h of holders) await h.close();
  await db?.drop();
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

pgOnly('two holders split the partitions evenly, disjoint; the survivor of a close takes them all', async () => {
  const a = holder(db!.url);
  const b = holder(db!.url);
  await a.leases.start();
  expect(a.leases.state().owned).toBe(LEASE_PARTITIONS); // alone: everything
  await b.leases.start();
  await holds('an even split', () => a.leases.state().owned === LEASE_PARTITIONS / 2 && b.leases.state().owned === LEASE_PARTITIONS / 2);
  const mine = new Set(a.leases.ownedPartitions());
  expect(b.leases.ownedPartitions().filter((p) => mine.has(p))).toEqual([]);
  for (let engineId = 1; engineId <= 200; engineId++) expect(a.leases.owns(engineId) !== b.leases.owns(engineId)).toBe(true);
  expect(partitionOf(65)).toBe(1);
  // what a gave up it reported lost before unlocking
  expect(a.lost.length).toBe(LEASE_PARTITIONS / 2);
  await a.leases.close();
  await holds('b owns all', () => b.leases.state().owned === LEASE_PARTITIONS);
  expect(b.leases.state().members).toBe(1);
  await b.leases.close();
});

pgOnly('a holder whose connection the database cuts owns nothing at once, then comes back for its share', async () => {
  const a = holder(db!.url);
  const b = holder(db!.url);
  await a.leases.start();
  await b.leases.start();
  await holds('an even split', () => a.leases.state().owned === LEASE_PARTITIONS / 2 && b.leases.state().owned === LEASE_PARTITIONS / 2);
  const lostBefore = a.lost.length;
  // cut a's lease session as a dying process would lose it
  const admin = new Client({ connectionString: db!.url });
  await admin.connect();
  const pids = await admin.query<{ pid: number }>(
    `SELECT DISTINCT l.pid FROM pg_locks l WHERE l.locktype = 'advisory' AND l.objsubid = 2 AND l.objid = ANY($1::oid[])`,
    [a.leases.ownedPartitions()],
  );
  expect(pids.rows.length).toBe(1);
  await admin.query('SELECT pg_terminate_backend($1)', [pids.rows[0].pid]);
  await admin.end();
  await holds('a lost its partitions', () => a.lost.length - lostBefore === LEASE_PARTITIONS / 2);
  // a reconnects and the partitions split again
  await holds(
    'a back with its share',
    () => a.leases.state().connected && a.leases.state().owned === LEASE_PARTITIONS / 2 && b.leases.state().owned === LEASE_PARTITIONS / 2,
  );
  expect(a.lost.length - lostBefore).toBe(LEASE_PARTITIONS / 2);
});

function role(url: string): { lease: HostRoleLease; changes: boolean[] } {
  const changes: boolean[] = [];
  const lease = new HostRoleLease({ databaseUrl: url, log, roundMs: 100, onChange: (h) => void changes.push(h) });
  holders.push(lease);
  return { lease, changes };
}

pgOnly('the Sparkplug host role: one holder of two; when its connection is cut it gives the role up and the other takes it', async () => {
  const a = role(db!.url);
  const b = role(db!.url);
  await a.lease.start();
  expect(a.lease.holds()).toBe(true);
  await b.lease.start();
  expect(b.lease.holds()).toBe(false);
  const admin = new Client({ connectionString: db!.url });
  await admin.connect();
  const pids = await admin.query<{ pid: number }>(
    "SELECT pid FROM pg_locks WHERE locktype = 'advisory' AND classid = $1::int::oid AND objsubid = 2",
    [0x4a570004],
  );
  expect(pids.rows.length).toBe(1);
  await admin.query('SELECT pg_terminate_backend($1)', [pids.rows[0].pid]);
  await admin.end();
  // a gives it up at once; whichever of the two takes it next (a reconnects too), only one holds it
  await holds('a gave the role up and one of the two holds it again', () => a.changes.includes(false) && (a.lease.holds() || b.lease.holds()));
  expect(a.lease.holds() && b.lease.holds()).toBe(false);
  expect(a.changes.slice(0, 2)).toEqual([true, false]);
  const [holder2, other] = a.lease.holds() ? [a, b] : [b, a];
  await holder2.lease.close(); // gives it up
  expect(holder2.changes.at(-1)).toBe(false);
  await holds('the other takes it', () => other.lease.holds());
  await other.lease.close();
});

it('the readings relay takes only well-formed flat arrays', () => {
  expect(decode([7, 1, 1_700_000_000_000, 82.5, 0, 7, 2, 1_700_000_000_000, 96, 1])).toEqual([
    { engineId: 7, channel: 'coolant_temp', ts: 1_700_000_000_000, value: 82.5, quality: 0 },
    { engineId: 7, channel: 'coolant_pressure', ts: 1_700_000_000_000, value: 96, quality: 1 },
  ]);
  expect(decode([7, 1, 1, 2])).toBeNull(); // not whole readings
  expect(decode([7, 99, 1, 2, 0])).toBeNull(); // unknown channel
  expect(decode([7, 1, 1, 'x', 0])).toBeNull();
  expect(decode([7, 1, 1, 2, 5])).toBeNull(); // quality
  expect(decode({ a: 1 })).toBeNull();
});
