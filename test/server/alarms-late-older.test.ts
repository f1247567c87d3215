/**
 * Late readings older than the newest already evaluated (a gateway's backlog sent after live data resumed, a
 * backfilled gap), on a real SQLite file / PostgreSQL database with the real mail catcher and outbox. Hand-made
 * sequences: live readings first, then older ones. They are evaluated for the record; the newer readings decide
 * the present, so what they show is recorded and closed, and nobody is e-mailed. The still-active case of late
 * data (newer than anything evaluated) is e-mailed once, with its times in the site's zone (America/Denver).
 */
import request from 'supertest';
import { waitFor } from './support/alarm-db';
import { auth, makeAlarmApp, samples, type AlarmApp } from './support/alarm-app';

let t: AlarmApp;

beforeAll(async () => {
  t = await makeAlarmApp({ tickMs: 1e9 });
  await t.ctx.models.Site.update({ timeZone: 'America/Denver' }, { where: { id: t.siteId } });
  await t.feature.rules.refreshEngines(true);
});
afterAll(async () => t.close());

interface Row {
  id: number;
  rule: string;
  state: string;
  active: boolean;
  closedAt: string | null;
  raisedAt: string;
  clearedAt: string | null;
}
const alarmsOf = async (state = 'all'): Promise<Row[]> =>
  (await request(t.app).get(`/api/alarms?state=${state}&engineId=${t.engineId}`).set(auth(t.tokens.operator)).expect(200)).body;
const highs = async () => (await alarmsOf()).filter((a) => a.rule === 'coolant_temp_high');
const historyOf = async (id: number) =>
  (await request(t.app).get(`/api/alarms/${id}`).set(auth(t.tokens.operator)).expect(200)).body.history as { event: string; at: string; note: string | null }[];

/** Denver's wall clock in the app's one format, worked out by hand from its offset (MST = UTC-7, MDT = UTC-6; IANA tz database). */
const denver = (ms: number, abbr: string, seconds = false) =>
  new Date(ms - (abbr === 'MDT' ? 6 : 7) * 3600_000)
    .toISOString()
    .slice(0, seconds ? 19 : 16)
    .replace('T', ' ') + ` ${abbr}`;

const now0 = Date.now();
const T = now0 - 3600_000;

it('live readings first, then an hour-old overheat that cleared within them: recorded and closed, nobody e-mailed', async () => {
  t.feed(samples(t.engineId, now0 - 60_000, 60, () => 85)); // live, normal
  t.feed(samples(t.engineId, T, 60, () => 85));
  t.feed(samples(t.engineId, T + 60_000, 60, () => 100)); // over 98 °C: raised after the 10 s on-delay
  t.feed(samples(t.engineId, T + 120_000, 120, () => 85)); // below limit - deadband: cleared after 30 s
  await t.feature.alarms.idle();

  const high = await highs();
  expect(high).toHaveLength(1);
  expect(high[0]).toMatchObject({ state: 'normal', active: false });
  expect(high[0].closedAt).not.toBeNull();
  expect(new Date(high[0].raisedAt).getTime()).toBe(T + 70_000);
  expect(new Date(high[0].clearedAt!).getTime()).toBe(T + 150_000);
  const h = await historyOf(high[0].id);
  expect(h.map((e) => e.event)).toEqual(['activate', 'clear', 'acknowledge']);
  expect(h[2].note).toMatch(/older than readings already evaluated .*raised and cleared within them.*nobody was e-mailed/);
  const abbr = /(MST|MDT)/.exec(h[2].note!)![1];
  expect(h[2].note).toContain(`measured ${denver(T + 70_000, abbr, true)}`); // in the site's zone

  expect(await alarmsOf('active')).toEqual([]);
  expect(await t.ctx.models.OutboxMessage.count()).toBe(0);
});

it('a repeat of those late readings (a redelivery) is not recorded twice', async () => {
  t.feed(samples(t.engineId, T + 60_000, 60, () => 100));
  t.feed(samples(t.engineId, T + 120_000, 120, () => 85));
  t.feature.rules.finishLate(Date.now(), true);
  await t.feature.alarms.idle();
  expect(await highs()).toHaveLength(1);
});

it('an overheat still present at the end of older late readings, gone in the newer ones: recorded as cleared then, nobody e-mailed', async () => {
  const T2 = now0 - 1800_000;
  t.feed(samples(t.engineId, T2, 60, () => 85));
  t.feed(samples(t.engineId, T2 + 60_000, 60, () => 101));
  await t.feature.alarms.idle();
  expect(await highs()).toHaveLength(1); // the late segment is still open: more of it may come
  t.feature.rules.finishLate(Date.now(), true); // (the tick does this once no late reading came for ALARM_LATE_AFTER_S)
  await t.feature.alarms.idle();

  const found = (await highs()).find((a) => new Date(a.raisedAt).getTime() === T2 + 70_000);
  expect(found).toMatchObject({ state: 'normal', active: false });
  expect(new Date(found!.clearedAt!).getTime()).toBe(T2 + 119_000);
  expect((await historyOf(found!.id))[2].note).toMatch(/still present at their end .*newer readings already evaluated do not show it.*nobody was e-mailed/);
  expect(await alarmsOf('active')).toEqual([]);
  expect(await t.ctx.models.OutboxMessage.count()).toBe(0);
});

it('late data newer than anything evaluated and still active when it catches up: one e-mail, saying so, times in the site zone', async () => {
  // a second engine of the same site whose gateway sends its store after an outage, oldest first
  const other = await t.ctx.models.Engine.create({
    siteId: t.siteId,
    name: 'Fire pump 2',
    duty: 'standby',
    capacityL: 60,
    coolantFamily: 'conventional',
    glycolType: 'ethylene',
    glycolPercent: 50,
    capPressureKpa: 100,
    oilDrainIntervalH: 250,
  });
  await t.feature.rules.refreshEngines(true);
  const T3 = Date.now() - 600_000; // ten minutes old: late (over ALARM_LATE_AFTER_S)
  t.feed(samples(other.id, T3, 300, () => 100));
  await t.feature.alarms.idle();
  const active = (await request(t.app).get(`/api/alarms?state=active&engineId=${other.id}`).set(auth(t.tokens.operator)).expect(200)).body as Row[];
  expect(active).toHaveLength(1);
  expect(await t.ctx.models.OutboxMessage.count()).toBe(0); // held while late

  t.feed(samples(other.id, Date.now() - 5000, 5, () => 100.5)); // caught up: still over the limit
  await t.feature.alarms.idle();
  const mail = await waitFor(() => t.ctx.models.CaughtMail.findOne({ where: { to: t.users.technician.email } }), 10_000);
  expect(mail.subject).toContain('(from late data)');
  const abbr = /Raised: +\d{4}-\d{2}-\d{2} \d{2}:\d{2} (MST|MDT)$/m.exec(mail.text ?? '')?.[1];
  expect(abbr).toBeDefined();
  expect(mail.text).toContain(`Raised:   ${denver(T3 + 10_000, abbr!)}`);
  expect(mail.text).toContain(`measured at ${denver(T3 + 10_000, abbr!)} and arrived at `);
  expect(mail.text).not.toMatch(/UTC/);

  t.feed(samples(other.id, Date.now(), 3, () => 100.5));
  await t.feature.alarms.idle();
  await t.feature.outbox()!.flush();
  expect(await t.ctx.models.OutboxMessage.count({ where: { alarmId: active[0].id } })).toBe(1);
});
