/**
 * Bench phase: lists at fleet scale. A DATA_DIR with BENCH_LIST_ENGINES (2,000) engines on 40 sites, with a
 * plausible record around them (per engine: 3 work orders with 4 steps each, 2 alarms of which 1 open, 6 service
 * events, 4 coolant tests; a plan override on every 10th engine), written straight into the database with the
 * server stopped; then the server answers the first page (offset=0, limit=50) of each list 20 times after 3 warm-up requests:
 * GET /api/work-orders (open statuses, as the work page asks), /api/due-list (14 days), /api/engines,
 * /api/alarms (open). p95 per list and the worst of them: listP95Ms. The server keeps a computed due list while
 * nothing it reads changes (at most a minute), so the due list is also timed computed afresh on every request
 * (another window each time): listDueColdP95Ms. Also the older whole-list answer of the
 * due list and the engine list (no offset), its size and time, to compare with the figures before paging.
 * Alone: `BENCH_PHASE=lists npm run bench` or `npx tsx test/bench/lists.ts`.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import { loadJwtSecret } from '../../server/auth/jwt-secret';
import { createTokenService } from '../../server/auth/tokens';
import { Db, startServerProcess } from '../server/support/telemetry-server';

const ENGINES = Number(process.env.BENCH_LIST_ENGINES ?? 2000);
const SITES = 40;
const REQUESTS = 20;
const WARM = 3;
const PAGE = 50;
const DAY = 86_400_000;

export interface ListTiming {
  path: string;
  p95Ms: number;
  p50Ms: number;
  bytes: number;
  rows: number;
  total: number | null;
}

export interface ListFigures {
  engines: number;
  sites: number;
  rows: Record<string, number>;
  seedS: number;
  lists: Record<'workOrders' | 'dueList' | 'engines' | 'alarms', ListTiming>;
  listP95Ms: number;
  /** The due list's first page computed afresh on every request (as after any change to what it reads). */
  dueCold: ListTiming;
  whole: Record<'dueList' | 'engines', ListTiming>;
}

const quantile = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(p * s.length))];
};

export async function seedListFleet(db: Db, now: number): Promise<number> {
  // the form Sequelize writes (SQLite keeps dates as text and parses this form back)
  const iso = (t: number) => new Date(t).toISOString().replace('T', ' ').replace('Z', ' +00:00');
  const stamp = iso(now);
  const adminId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'admin', FALSE, ?, ?)`,
    ['bench-lists@example.test', 'Bench admin', bcrypt.hashSync(`bench-${now}`, 4), stamp, stamp],
  );
  const techId = await db.run(
    `INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'technician', FALSE, ?, ?)`,
    ['bench-lists-tech@example.test', 'Bench technician', bcrypt.hashSync(`bench-tech-${now}`, 4), stamp, stamp],
  );
  await db.exec('BEGIN');
  const siteIds: number[] = [];
  for (let s = 0; s < SITES; s++)
    siteIds.push(
      await db.run(`INSERT INTO sites (name, time_zone) VALUES (?, ?)`, [`Bench site ${String(s + 1).padStart(2, '0')}`, s % 2 ? 'America/Denver' : 'UTC']),
    );
  const statuses = ['requested', 'planned', 'in-progress', 'closed'];
  const kinds = ['filter-change', 'coolant-test', 'leak-check', 'oil-drain', 'general-repair'];
  const tasks = ['oil-drain', 'filter-change', 'coolant-test', 'drain-flush-refill', 'weekly-inspection', 'monthly-exercise'];
  const rules = ['coolant_temp_high', 'coolant_temp_low_standby', 'coolant_pressure_low_running'];
  for (let i = 0; i < ENGINES; i++) {
    const siteId = siteIds[i % SITES];
    const runHours = (i * 37) % 9000;
    const engineId = await db.run(
      `INSERT INTO engines (site_id, name, duty, capacity_l, coolant_family, glycol_type, glycol_percent, cap_pressure_kpa, oil_drain_interval_h, run_hours, safe_open_temp_c, out_of_service, created_at, updated_at)
       VALUES (?, ?, ?, 60, ?, 'ethylene', 50, 100, 250, ?, 50, FALSE, ?, ?)`,
      [siteId, `Unit ${String(i + 1).padStart(4, '0')}`, i % 3 ? 'standby' : 'prime', i % 4 ? 'conventional' : 'extended-life', runHours, stamp, stamp],
    );
    for (let w = 0; w < 3; w++) {
      const due = w === 2 ? null : iso(now + ((i * 7 + w * 11) % 60) * DAY - 20 * DAY).slice(0, 10);
      const orderId = await db.run(
        `INSERT INTO work_orders (engine_id, kind, title, priority, due_date, assignee_id, status, created_by, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
        [
          engineId,
          kinds[(i + w) % kinds.length],
          `Check ${w + 1} on unit ${i + 1}`,
          w ? 'medium' : 'high',
          due,
          w ? techId : null,
          statuses[(i + w) % 4],
          adminId,
          stamp,
          stamp,
        ],
      );
      for (let p = 0; p < 4; p++)
        await db.run(
          `INSERT INTO work_order_steps (work_order_id, position, key, title, input, optional, gated, done_at) VALUES (?, ?, ?, ?, 'confirmation', FALSE, FALSE, ?)`,
          [orderId, p, `step-${p}`, `Step ${p + 1}`, p < w ? stamp : null],
        );
    }
    for (let a = 0; a < 2; a++) {
      const raised = now - ((i * 13 + a * 29) % 2000) * 60_000;
      await db.run(
        `INSERT INTO alarms (engine_id, rule, priority, state, active, raised_at, value, unit, message, closed_at, escalation_level, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, 95, 'degC', ?, ?, 0, ?, ?)`,
        [
          engineId,
          rules[a],
          a ? 'medium' : 'high',
          a ? 'normal' : 'unacknowledged',
          !a,
          iso(raised),
          `Coolant alarm ${a + 1} on unit ${i + 1}`,
          a ? iso(raised + 600_000) : null,
          stamp,
          stamp,
        ],
      );
    }
    for (let e = 0; e < 6; e++)
      await db.run(`INSERT INTO service_events (engine_id, task_key, done_at, run_hours, created_at) VALUES (?, ?, ?, ?, ?)`, [
        engineId,
        tasks[e],
        iso(now - ((i * 17 + e * 41) % 400) * DAY),
        Math.max(0, runHours - e * 40),
        stamp,
      ]);
    for (let t = 0; t < 4; t++)
      await db.run(
        `INSERT INTO coolant_tests (engine_id, tested_at, method, glycol_percent, ph, source, created_at, updated_at) VALUES (?, ?, 'strip', 50, 9.5, 'manual', ?, ?)`,
        [engineId, iso(now - (t * 90 + (i % 30)) * DAY), stamp, stamp],
      );
    if (i % 10 === 0)
      await db.run(
        `INSERT INTO service_tasks (engine_id, task_key, every_hours, every_days, disabled, created_at, updated_at) VALUES (?, 'oil-drain', 500, 365, FALSE, ?, ?)`,
        [engineId, stamp, stamp],
      );
  }
  await db.exec('COMMIT');
  return adminId;
}

export async function listsPhase(progress: (m: string) => void): Promise<ListFigures> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'jw-bench-lists-'));
  try {
    let server = await startServerProcess({ dataDir, group: true });
    const ports = server.ports;
    await server.stop();
    const now = Date.now();
    const t0 = performance.now();
    let db = new Db(server.databaseUrl);
    const adminId = await seedListFleet(db, now);
    const rows: Record<string, number> = {};
    for (const t of ['engines', 'work_orders', 'work_order_steps', 'alarms', 'service_events', 'coolant_tests', 'service_tasks'])
      rows[t] = Number((await db.get<{ n: number }>(`SELECT COUNT(*) AS n FROM ${t}`)).n);
    await db.close();
    db = null as unknown as Db;
    const seedS = (performance.now() - t0) / 1000;
    progress(`lists: ${ENGINES} engines on ${SITES} sites seeded in ${seedS.toFixed(0)} s; server restarts`);

    server = await startServerProcess({ dataDir, ports, group: true });
    try {
      const token = createTokenService(loadJwtSecret(dataDir)).sign({ id: adminId, email: 'bench-lists@example.test', role: 'admin' });
      const once = async (p: string): Promise<{ ms: number; bytes: number; rows: number; total: number | null }> => {
        const t = performance.now();
        const res = await fetch(`${server.url}${p}`, { headers: { authorization: `Bearer ${token}` } });
        const text = await res.text();
        const ms = performance.now() - t;
        if (!res.ok) throw new Error(`${p} answered ${res.status}: ${text.slice(0, 200)}\n${server.log().slice(-3000)}`);
        const body = JSON.parse(text) as unknown;
        const b = body as { items?: unknown[]; sites?: { entries: unknown[] }[]; total?: number };
        const n = Array.isArray(body) ? body.length : b.items ? b.items.length : (b.sites ?? []).reduce((k, s) => k + s.entries.length, 0);
        return { ms, bytes: Buffer.byteLength(text), rows: n, total: typeof b.total === 'number' ? b.total : null };
      };
      const measure = async (p: string | ((i: number) => string), requests = REQUESTS): Promise<ListTiming> => {
        const at = (i: number) => (typeof p === 'string' ? p : p(i));
        for (let i = 0; i < WARM; i++) await once(at(-1 - i)); // warm the route (and let the freshly started server settle)
        const runs: number[] = [];
        let last = await once(at(0));
        runs.push(last.ms);
        for (let i = 1; i < requests; i++) runs.push((last = await once(at(i))).ms);
        return { path: at(0), p95Ms: quantile(runs, 0.95), p50Ms: quantile(runs, 0.5), bytes: last.bytes, rows: last.rows, total: last.total };
      };
      const page = `offset=0&limit=${PAGE}`;
      const lists = {
        workOrders: await measure(`/api/work-orders?status=requested,planned,in-progress,waiting-sign-off&${page}`),
        dueList: await measure(`/api/due-list?windowDays=14&${page}`),
        engines: await measure(`/api/engines?${page}`),
        alarms: await measure(`/api/alarms?state=open&${page}`),
      };
      // the due list kept by the server while nothing it reads changed: computed afresh each time here, by asking
      // another window (days) on each request, as after a change
      const dueCold = await measure((i) => `/api/due-list?windowDays=${i < 0 ? 40 - i : i + 1}&${page}`);
      const whole = { dueList: await measure('/api/due-list?windowDays=14', 5), engines: await measure('/api/engines', 5) };
      return { engines: ENGINES, sites: SITES, rows, seedS, lists, listP95Ms: Math.max(...Object.values(lists).map((l) => l.p95Ms)), dueCold, whole };
    } finally {
      await server.stop();
    }
  } finally {
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

export function printLists(r: ListFigures): void {
  const line = (k: string, v: string) => console.log(`  ${k.padEnd(46)} ${v}`);
  const kb = (n: number) => `${(n / 1024).toFixed(1)} kB`;
  console.log(`\n7. Lists (${r.engines} engines on ${r.sites} sites; first page of ${PAGE}; p95 of ${REQUESTS} requests after ${WARM} warm-up requests)`);
  line(
    'rows in the database',
    Object.entries(r.rows)
      .map(([k, v]) => `${k} ${v.toLocaleString('en-US')}`)
      .join(', '),
  );
  for (const [k, l] of Object.entries(r.lists))
    line(`${k} first page p95 / p50`, `${l.p95Ms.toFixed(1)} / ${l.p50Ms.toFixed(1)} ms, ${kb(l.bytes)}, ${l.rows} rows of ${l.total ?? 'n/a (no total)'}`);
  line('worst first page p95 (listP95Ms)', `${r.listP95Ms.toFixed(1)} ms   (goal < 200 ms)`);
  line(
    'dueList first page computed afresh p95 / p50',
    `${r.dueCold.p95Ms.toFixed(1)} / ${r.dueCold.p50Ms.toFixed(1)} ms (listDueColdP95Ms; another window each request)`,
  );
  for (const [k, l] of Object.entries(r.whole)) line(`${k} whole list (no offset) p95`, `${l.p95Ms.toFixed(1)} ms, ${kb(l.bytes)}, ${l.rows} rows`);
}

export function listsJson(r: ListFigures): Record<string, number | null> {
  const r1 = (x: number) => Math.round(x * 10) / 10;
  return {
    listP95Ms: r1(r.listP95Ms),
    listEngines: r.engines,
    listWorkOrdersP95Ms: r1(r.lists.workOrders.p95Ms),
    listDueP95Ms: r1(r.lists.dueList.p95Ms),
    listEnginesP95Ms: r1(r.lists.engines.p95Ms),
    listAlarmsP95Ms: r1(r.lists.alarms.p95Ms),
    listDueColdP95Ms: r1(r.dueCold.p95Ms),
    listDueColdP50Ms: r1(r.dueCold.p50Ms),
    dueWholeP95Ms: r1(r.whole.dueList.p95Ms),
    dueWholeBytes: r.whole.dueList.bytes,
    enginesWholeBytes: r.whole.engines.bytes,
  };
}

if (require.main === module) {
  const t0 = Date.now();
  listsPhase((m) => process.stderr.write(`[${((Date.now() - t0) / 1000).toFixed(1)} s] ${m}\n`)).then(
    (r) => {
      printLists(r);
      if (process.env.BENCH_JSON)
        fs.writeFileSync(
          process.env.BENCH_JSON,
          JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, node: process.version, ...listsJson(r) }, null, 2) + '\n',
        );
      process.exit(0);
    },
    (err) => {
      console.error(err);
      process.exit(1);
    },
  );
}
