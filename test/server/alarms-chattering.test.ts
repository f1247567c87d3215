/**
 * Chattering (ISA-18.2: an alarm that repeatedly goes in and out of alarm within a short time; the test
 * figures, 3 times in 60 s, are a common working threshold, configurable) and the paged history, on a real
 * SQLite file through the real rule engine and routes.
 */
import request from 'supertest';
import { auth, makeAlarmApp, samples, type AlarmApp } from './support/alarm-app';

let t: AlarmApp;
const T0 = Date.now() - 20 * 60_000;

beforeAll(async () => {
  // hand-made batches up to 20 min back: not "late data" here
  t = await makeAlarmApp({ tickMs: 1e9, lateAfterMs: 24 * 3600_000 });
});
afterAll(async () => t.close());

interface Row {
  id: number;
  rule: string;
  chatteringAt: string | null;
}
interface Entry {
  at: string;
  event: string;
  note: string | null;
}

let alarmId: number;

it('an alarm that comes into alarm 3 times within 60 s is marked chattering, once, with advice in words', async () => {
  // no delays on this engine's high-temperature rule: every swing over the limit is an activation
  await request(t.app)
    .put(`/api/rules/engines/${t.engineId}`)
    .set(auth(t.tokens.admin))
    .send({ rules: [{ rule: 'coolant_temp_high', enabled: true, params: { onDelayS: 0, offDelayS: 0 } }] })
    .expect(200);
  // 100 °C and 90 °C in turns of 5 s for 60 s: into alarm every 10 s
  t.feed(samples(t.engineId, T0, 60, (s) => (Math.floor(s / 5) % 2 === 0 ? 100 : 90)));
  await t.feature.alarms.idle();
  const list = ((await request(t.app).get(`/api/alarms?state=all&engineId=${t.engineId}`).set(auth(t.tokens.operator)).expect(200)).body as Row[]).filter(
    (a) => a.rule === 'coolant_temp_high',
  );
  expect(list).toHaveLength(1);
  alarmId = list[0].id;
  // third activation at T0 + 20 s
  expect(list[0].chatteringAt).toBe(new Date(T0 + 20_000).toISOString());
  const detail = (await request(t.app).get(`/api/alarms/${alarmId}`).set(auth(t.tokens.operator)).expect(200)).body as {
    history: Entry[];
    historyTotal: number;
  };
  const notes = detail.history.filter((h) => h.event === 'note' && /Chattering/.test(h.note ?? ''));
  expect(notes).toHaveLength(1);
  expect(notes[0].note).toMatch(/came into alarm 3 times within 60 s\. A candidate for a longer deadband or on-\/off-delay/);
  expect(detail.history.filter((h) => h.event === 'activate')).toHaveLength(6);
});

it('the performance report lists it under the test applied; the test is configurable per request', async () => {
  const from = T0 - 60_000;
  const to = Date.now();
  const r = (await request(t.app).get(`/api/alarms/performance?from=${from}&to=${to}`).set(auth(t.tokens.operator)).expect(200)).body;
  expect(r.chatter).toEqual({ count: 3, windowMs: 60_000 });
  expect(r.chattering).toEqual([{ key: 'Fire pump 1/coolant_temp_high', bursts: 1, maxInWindow: 6 }]);
  const strict = (
    await request(t.app).get(`/api/alarms/performance?from=${from}&to=${to}&chatterCount=7&chatterWindowS=60`).set(auth(t.tokens.operator)).expect(200)
  ).body;
  expect(strict.chatter).toEqual({ count: 7, windowMs: 60_000 });
  expect(strict.chattering).toEqual([]);
  const bad = await request(t.app).get(`/api/alarms/performance?chatterCount=1`).set(auth(t.tokens.operator)).expect(400);
  expect(bad.body.field).toBe('chatterCount');
});

it('the history comes in pages, in time order', async () => {
  const first = (await request(t.app).get(`/api/alarms/${alarmId}?limit=5`).set(auth(t.tokens.operator)).expect(200)).body as {
    history: Entry[];
    historyTotal: number;
  };
  expect(first.history).toHaveLength(5);
  expect(first.historyTotal).toBeGreaterThan(10);
  const all: Entry[] = [...first.history];
  for (let offset = 5; offset < first.historyTotal; offset += 5) {
    const page = (await request(t.app).get(`/api/alarms/${alarmId}/history?offset=${offset}&limit=5`).set(auth(t.tokens.operator)).expect(200)).body;
    expect(page).toMatchObject({ total: first.historyTotal, limit: 5, offset });
    all.push(...page.entries);
  }
  expect(all).toHaveLength(first.historyTotal);
  const times = all.map((e) => Date.parse(e.at));
  expect(times).toEqual([...times].sort((a, b) => a - b));
  expect((await request(t.app).get(`/api/alarms/${alarmId}/history?limit=0`).set(auth(t.tokens.operator)).expect(400)).body.field).toBe('limit');
  await request(t.app).get(`/api/alarms/999999/history`).set(auth(t.tokens.operator)).expect(404);
});
