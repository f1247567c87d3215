/**
 * Server paging of the four long lists (work orders, due list, engines, alarms) on a real database: walking
 * the pages with a small limit gives exactly the whole list in its order, with ties in the sort keys (same
 * engine names, same due dates, same raise times) never repeating or skipping a row; the text filter q and the
 * other filters; a user limited to one site never sees another site's rows; bad limit/offset answered 400.
 */
import request from 'supertest';
import { auth, makeAlarmApp, PASSWORD, type AlarmApp } from './support/alarm-app';

let t: AlarmApp;
let siteA: number;
let siteB: number;
const engineSite = new Map<number, number>();
let plannerA: string;

beforeAll(async () => {
  t = await makeAlarmApp(); // the alarm feature mounted (with a site and an engine of its own)
  const m = t.ctx.models;
  engineSite.set(t.engineId, t.siteId);
  siteA = (await m.Site.create({ name: 'North pump house', timeZone: 'UTC' })).id;
  siteB = (await m.Site.create({ name: 'South yard', timeZone: 'UTC' })).id;
  const base = {
    capacityL: 80,
    coolantFamily: 'conventional' as const,
    glycolType: 'ethylene' as const,
    glycolPercent: 50,
    capPressureKpa: 100,
    oilDrainIntervalH: 250,
  };
  // three engines of one name at site A: the sort by name ties, the id decides
  const names: [number, string][] = [
    [siteA, 'Twin set'],
    [siteA, 'Twin set'],
    [siteA, 'Twin set'],
    [siteA, 'Fire pump'],
    [siteA, 'Booster'],
    [siteB, 'Twin set'],
    [siteB, 'Lift station'],
    [siteB, 'Aerator'],
  ];
  for (const [siteId, name] of names) {
    const e = await m.Engine.create({ ...base, siteId, name, duty: 'standby', runHours: 100 });
    engineSite.set(e.id, siteId);
  }
  const ids = [...engineSite.keys()];
  // work orders: many with the same due date, some undated
  let n = 0;
  for (const engineId of ids)
    for (const dueDate of ['2026-07-01', '2026-07-01', null, '2026-06-15']) {
      n++;
      await m.WorkOrder.create({
        engineId,
        kind: 'leak-check',
        title: n % 5 === 0 ? `Hose clamp ${n}` : `Leak check ${n}`,
        priority: 'medium',
        dueDate,
        assigneeId: null,
        status: n % 7 === 0 ? 'closed' : 'planned',
        createdBy: t.users.planner.id,
        requestedBy: null,
        description: null,
      });
    }
  // alarms: raised at the same instant on every engine (ties), one open and two closed per engine
  const at = new Date(Date.UTC(2026, 5, 1, 12));
  for (const engineId of ids)
    for (const [rule, closed] of [
      ['coolant_temp_high', false],
      ['coolant_temp_low_standby', true],
      ['heater_not_holding', true],
    ] as const)
      await m.Alarm.create({
        engineId,
        rule,
        priority: 'high',
        state: closed ? 'normal' : 'unacknowledged',
        raisedAt: at,
        value: 99,
        worstValue: 99,
        unit: 'degC',
        message: `${rule} on ${engineId}`,
        closedAt: closed ? new Date(at.getTime() + 60_000) : null,
      });

  const admin = auth(t.tokens.admin);
  const u = (
    await request(t.app)
      .post('/api/users')
      .set(admin)
      .send({ email: 'planner-a@example.test', name: 'Planner A', password: PASSWORD, role: 'planner' })
      .expect(201)
  ).body;
  await request(t.app)
    .put(`/api/users/${u.id}/sites`)
    .set(admin)
    .send({ siteIds: [siteA] })
    .expect(200);
  plannerA = (await request(t.app).post('/api/auth/login').send({ email: 'planner-a@example.test', password: PASSWORD }).expect(200)).body.token;
});
afterAll(() => t.close());

type Row = { id?: number; engineId?: number; taskKey?: string };
interface Lister {
  name: string;
  /** The URL without paging parameters (query string started). */
  url: string;
  /** Rows of a paged answer. */
  rows(body: Record<string, unknown>): Row[];
  /** Rows of the older whole-list answer. */
  whole(body: unknown): Row[];
  key(r: Row): string;
  engineOf(r: Row): number;
}
const dueRows = (body: unknown) => (body as { sites: { entries: Row[] }[] }).sites.flatMap((s) => s.entries);
const LISTS: Lister[] = [
  {
    name: 'work orders',
    url: '/api/work-orders?status=planned,closed',
    rows: (b) => b.items as Row[],
    whole: (b) => b as Row[],
    key: (r) => String(r.id),
    engineOf: (r) => r.engineId!,
  },
  {
    name: 'due list',
    url: '/api/due-list?include=all&windowDays=30',
    rows: dueRows,
    whole: dueRows,
    key: (r) => `${r.engineId}:${r.taskKey}`,
    engineOf: (r) => r.engineId!,
  },
  {
    name: 'engines',
    url: '/api/engines?includeRetired=false',
    rows: (b) => b.items as Row[],
    whole: (b) => b as Row[],
    key: (r) => String(r.id),
    engineOf: (r) => r.id!,
  },
  {
    name: 'alarms',
    url: '/api/alarms?state=all',
    rows: (b) => b.items as Row[],
    whole: (b) => b as Row[],
    key: (r) => String(r.id),
    engineOf: (r) => r.engineId!,
  },
];

const get = (token: string, url: string) => request(t.app).get(url).set(auth(token));

/** Every page with `limit`, in order; checks total and limit/offset echo on each. */
async function walk(l: Lister, token: string, limit: number, extra = ''): Promise<{ rows: Row[]; pages: number; total: number }> {
  const rows: Row[] = [];
  let total = -1;
  let pages = 0;
  for (let offset = 0; ; offset += limit) {
    const body = (await get(token, `${l.url}${extra}&limit=${limit}&offset=${offset}`).expect(200)).body;
    expect(body).toMatchObject({ limit, offset });
    if (total < 0) total = body.total;
    expect(body.total).toBe(total);
    const page = l.rows(body);
    pages++;
    if (offset >= total) {
      expect(page).toEqual([]);
      break;
    }
    expect(page.length).toBe(Math.min(limit, total - offset));
    rows.push(...page);
  }
  return { rows, pages, total };
}

describe.each(LISTS)('$name paged on the server', (l) => {
  it('first, next and last pages give the whole list in its order, ties never repeated or skipped', async () => {
    const whole = l.whole((await get(t.tokens.admin, l.url).expect(200)).body).map(l.key);
    expect(whole.length).toBeGreaterThan(7);
    for (const limit of [1, 3, 7]) {
      const { rows, total, pages } = await walk(l, t.tokens.admin, limit);
      const keys = rows.map(l.key);
      expect(total).toBe(whole.length);
      expect(new Set(keys).size).toBe(keys.length);
      expect(keys).toEqual(whole);
      expect(pages).toBe(Math.ceil(total / limit) + 1);
    }
  });

  it('the default page is 50 rows', async () => {
    const body = (await get(t.tokens.admin, `${l.url}&offset=0`).expect(200)).body;
    expect(body.limit).toBe(50);
    expect(l.rows(body).length).toBe(Math.min(50, body.total));
  });

  it('a user limited to one site sees only its rows, whatever the filters ask', async () => {
    const { rows, total } = await walk(l, plannerA, 4);
    expect(total).toBeGreaterThan(0);
    for (const r of rows) expect(engineSite.get(l.engineOf(r))).toBe(siteA);
    expect((await get(plannerA, `${l.url}&q=south&offset=0`).expect(200)).body.total).toBe(0);
    const adminSouth = (await get(t.tokens.admin, `${l.url}&q=south&offset=0&limit=500`).expect(200)).body;
    expect(adminSouth.total).toBeGreaterThan(0);
    for (const r of l.rows(adminSouth)) expect(engineSite.get(l.engineOf(r))).toBe(siteB);
  });

  it('q matches engine names without regard to case', async () => {
    const body = (await get(t.tokens.admin, `${l.url}&q=tWIN&offset=0&limit=500`).expect(200)).body;
    expect(body.total).toBeGreaterThan(0);
    const made = [...engineSite.keys()].slice(1);
    const twins = made.slice(0, 3).concat(made[5]);
    for (const r of l.rows(body)) expect(twins).toContain(l.engineOf(r));
    // a wildcard of SQL LIKE is plain text here
    expect((await get(t.tokens.admin, `${l.url}&q=%25&offset=0`).expect(200)).body.total).toBe(0);
  });

  it.each([
    ['limit=0', 'limit'],
    ['limit=501', 'limit'],
    ['limit=abc', 'limit'],
    ['limit=2.5', 'limit'],
    ['offset=-1', 'offset'],
    ['offset=1.5', 'offset'],
    ['offset=x', 'offset'],
    ['offset=2000000', 'offset'],
  ])('%s is answered 400 naming the field', async (bad, field) => {
    const withOffset = bad.startsWith('offset') ? bad : `offset=0&${bad}`;
    const res = await get(t.tokens.admin, `${l.url}&${withOffset}`).expect(400);
    expect(res.body.field).toBe(field);
    expect(res.body.error ?? res.body.message).toMatch(new RegExp(`^${field}: must be`));
  });
});

describe('filters beside paging', () => {
  it('work orders: q finds the title, the site name and the engine name; status and site filters still apply', async () => {
    const clamp = (await get(t.tokens.admin, '/api/work-orders?status=planned,closed&q=hose CLAMP&offset=0&limit=500').expect(200)).body;
    expect(clamp.total).toBeGreaterThan(0);
    for (const o of clamp.items) expect(o.title).toMatch(/^Hose clamp/);
    const north = (await get(t.tokens.admin, '/api/work-orders?status=planned,closed&q=north pump&offset=0&limit=500').expect(200)).body;
    expect(north.total).toBe(5 * 4);
    const closedB = (await get(t.tokens.admin, `/api/work-orders?status=closed&siteId=${siteB}&offset=0&limit=500`).expect(200)).body;
    for (const o of closedB.items) {
      expect(o.status).toBe('closed');
      expect(engineSite.get(o.engineId)).toBe(siteB);
    }
  });

  it('alarms: the state filter and engineId narrow the page and its total', async () => {
    const open = (await get(t.tokens.admin, '/api/alarms?state=open&offset=0&limit=3').expect(200)).body;
    expect(open.total).toBe(engineSite.size);
    const engineId = [...engineSite.keys()][7];
    const one = (await get(t.tokens.admin, `/api/alarms?state=all&engineId=${engineId}&offset=0`).expect(200)).body;
    expect(one.total).toBe(3);
    expect((await get(plannerA, `/api/alarms?state=all&engineId=${engineId}&offset=0`).expect(200)).body.total).toBe(0);
    // site, priority and one alarm state, for the history view
    expect((await get(t.tokens.admin, `/api/alarms?state=all&siteId=${siteB}&offset=0`).expect(200)).body.total).toBe(3 * 3);
    expect((await get(plannerA, `/api/alarms?state=all&siteId=${siteB}&offset=0`).expect(200)).body.total).toBe(0);
    expect((await get(t.tokens.admin, '/api/alarms?state=all&alarmState=normal&offset=0').expect(200)).body.total).toBe(2 * engineSite.size);
    expect((await get(t.tokens.admin, '/api/alarms?state=active&alarmState=normal&offset=0').expect(200)).body.total).toBe(0);
    expect((await get(t.tokens.admin, '/api/alarms?state=all&priority=low&offset=0').expect(200)).body.total).toBe(0);
    expect((await get(t.tokens.admin, '/api/alarms?state=all&priority=high&offset=0').expect(200)).body.total).toBe(3 * engineSite.size);
  });

  it('due list: each site on a page keeps its counts over all pages and says how many entries it has', async () => {
    const all = (await get(t.tokens.admin, '/api/due-list?include=all&windowDays=30').expect(200)).body;
    const page = (await get(t.tokens.admin, '/api/due-list?include=all&windowDays=30&offset=0&limit=2').expect(200)).body;
    const first = all.sites[0];
    expect(page.sites[0]).toMatchObject({ siteId: first.siteId, overdue: first.overdue, dueSoon: first.dueSoon, entryTotal: first.entries.length });
    expect(page.sites[0].entries).toEqual(first.entries.slice(0, 2));
  });

  it('due list: a change to what it reads shows at once (the server keeps a computed list only while nothing changed)', async () => {
    const url = '/api/due-list?include=all&windowDays=30&offset=0&limit=500';
    const before = dueRows((await get(t.tokens.admin, url).expect(200)).body) as (Row & { openWorkOrderId: number | null; runHours: number })[];
    const free = before.find((e) => e.openWorkOrderId === null && e.taskKey === 'oil-drain')!;
    const created = (
      await request(t.app)
        .post('/api/work-orders')
        .set(auth(t.tokens.planner))
        .send({ engineId: free.engineId, kind: 'oil-drain', serviceTaskKey: 'oil-drain' })
        .expect(201)
    ).body;
    const after = dueRows((await get(t.tokens.admin, url).expect(200)).body) as (Row & { openWorkOrderId: number | null })[];
    expect(after.find((e) => e.engineId === free.engineId && e.taskKey === 'oil-drain')!.openWorkOrderId).toBe(created.id);
    // run hours changed by the planner: the entries carry the new hours
    await request(t.app)
      .post(`/api/engines/${free.engineId}/run-hours`)
      .set(auth(t.tokens.planner))
      .send({ runHours: free.runHours + 25, reason: 'read from the hour meter' })
      .expect(200);
    const again = dueRows((await get(t.tokens.admin, url).expect(200)).body) as (Row & { runHours: number })[];
    expect(again.find((e) => e.engineId === free.engineId)!.runHours).toBe(free.runHours + 25);
  });

  it('engines: the whole list without offset stays for the fleet board', async () => {
    const whole = (await get(t.tokens.admin, '/api/engines').expect(200)).body;
    expect(Array.isArray(whole)).toBe(true);
    expect(whole.length).toBe(engineSite.size);
  });
});
