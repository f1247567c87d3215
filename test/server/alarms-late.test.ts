/**
 * Alarms from late data (backfill, store-and-forward after an outage), on a real SQLite file with the real
 * mail catcher and outbox: readings older than ALARM_LATE_AFTER_S (default 120 s) when they arrive are
 * evaluated for the record, but nobody is paged for history:
 * - raised and cleared within the late data: recorded (closed, with a note saying why), never e-mailed;
 * - raised from late data and still active once the engine's data has caught up: e-mailed once, saying so.
 */
import request from 'supertest';
import { waitFor } from './support/alarm-db';
import { auth, makeAlarmApp, samples, type AlarmApp } from './support/alarm-app';

let t: AlarmApp;

beforeAll(async () => {
  t = await makeAlarmApp({ tickMs: 1e9 });
});
afterAll(async () => t.close());

interface Row {
  id: number;
  rule: string;
  state: string;
  active: boolean;
  closedAt: string | null;
  raisedAt: string;
}
const alarmsOf = async (state = 'all'): Promise<Row[]> =>
  (await request(t.app).get(`/api/alarms?state=${state}&engineId=${t.engineId}`).set(auth(t.tokens.operator)).expect(200)).body;
const outboxFor = (alarmId: number) => t.ctx.models.OutboxMessage.count({ where: { alarmId } });

it('an overheat raised and cleared within three-day-old data is recorded and closed, and nobody is e-mailed', async () => {
  const T = Date.now() - 3 * 86_400_000;
  t.feed(samples(t.engineId, T, 60, () => 85));
  t.feed(samples(t.engineId, T + 60_000, 60, () => 100)); // over 98 °C for 60 s: raised after the 10 s on-delay
  t.feed(samples(t.engineId, T + 120_000, 120, () => 85)); // back under limit - deadband: cleared after 30 s
  await t.feature.alarms.idle();

  const high = (await alarmsOf()).filter((a) => a.rule === 'coolant_temp_high');
  expect(high).toHaveLength(1);
  expect(high[0]).toMatchObject({ state: 'normal', active: false });
  expect(high[0].closedAt).not.toBeNull();
  expect(new Date(high[0].raisedAt).getTime()).toBe(T + 70_000);
  const detail = (await request(t.app).get(`/api/alarms/${high[0].id}`).set(auth(t.tokens.operator)).expect(200)).body as {
    history: { event: string; note: string | null }[];
  };
  // in time order: raised and cleared three days back, the note and the closing written when the data arrived
  expect(detail.history.map((h) => h.event)).toEqual(['activate', 'clear', 'note', 'acknowledge']);
  expect(detail.history[2].note).toMatch(/arrived late/);
  expect(detail.history[3].note).toMatch(/already cleared when its data arrived, so nobody was e-mailed/);

  // nothing annunciated, nothing in the outbox for it (the e-mail would be queued before idle() returns)
  expect(await alarmsOf('active')).toEqual([]);
  expect(await outboxFor(high[0].id)).toBe(0);
  expect(await t.ctx.models.OutboxMessage.count()).toBe(0);
});

it('an overheat from hour-old data still active when the data catches up is e-mailed once, saying the data came late', async () => {
  const T = Date.now() - 3600_000;
  t.feed(samples(t.engineId, T, 60, () => 85));
  t.feed(samples(t.engineId, T + 60_000, 300, () => 100));
  await t.feature.alarms.idle();
  const high = (await alarmsOf('active')).filter((a) => a.rule === 'coolant_temp_high');
  expect(high).toHaveLength(1);
  const id = high[0].id;
  // still late: held, not e-mailed yet
  expect(await outboxFor(id)).toBe(0);

  // the gateway's store is emptied and live data follows: still over the limit
  t.feed(samples(t.engineId, Date.now() - 10_000, 10, () => 100.5));
  await t.feature.alarms.idle();
  const mail = await waitFor(() => t.ctx.models.CaughtMail.findOne({ where: { to: t.users.technician.email } }), 10_000);
  expect(mail.subject).toContain('Coolant temperature high');
  expect(mail.subject).toContain('(from late data)');
  expect(mail.text).toMatch(
    /The data came late: the readings behind this alarm were measured at .* and arrived at .*\. The condition was still active when the data caught up\./,
  );

  // more live data: no second e-mail
  t.feed(samples(t.engineId, Date.now(), 3, () => 100.5));
  await t.feature.alarms.idle();
  expect(await outboxFor(id)).toBe(1);
  const events = (await request(t.app).get(`/api/alarms/${id}`).set(auth(t.tokens.operator)).expect(200)).body.history as {
    event: string;
    note: string | null;
  }[];
  expect(events.filter((e) => e.event === 'notified')).toHaveLength(1);
  expect(events.find((e) => e.event === 'notified')!.note).toMatch(/from late data, still active/);
});
