/**
 * Rule engine and alarm lifecycle on a real SQLite file with the real mail catcher: hand-made reading
 * batches through the onReadings handler, then the routes (acknowledge, shelve with expiry, notes,
 * refused transitions, role checks), e-mail over SMTP, preview over stored readings.
 * The clock tick is driven by the test (tickMs very long) so silences happen only when the test says so.
 */
import request from 'supertest';
import { CHANNELS } from '../../shared/channels';
import { startCompactor } from '../../server/services/history/compactor';
import { waitFor } from './support/alarm-db';
import { auth, makeAlarmApp, samples, type AlarmApp } from './support/alarm-app';

let t: AlarmApp;
const T0 = Date.now() - 30 * 60_000;

beforeAll(async () => {
  // the hand-made batches lie up to 30 min back: not "late data" here (that has its own test, alarms-late.test.ts)
  t = await makeAlarmApp({ tickMs: 1e9, lateAfterMs: 24 * 3600_000 });
});
afterAll(async () => t.close());

const api = () => request(t.app);
const alarmsOf = async (state = 'all') => (await api().get(`/api/alarms?state=${state}&engineId=${t.engineId}`).set(auth(t.tokens.operator)).expect(200)).body;

describe('rule engine on reading batches', () => {
  let alarmId: number;

  it('raises coolant high temperature once, with an e-mail to the technician on call', async () => {
    t.feed(samples(t.engineId, T0, 60, () => 85));
    t.feed(samples(t.engineId, T0 + 60_000, 60, (s) => 100 + 0.2 * Math.sin(s)));
    t.feed(samples(t.engineId, T0 + 120_000, 60, (s) => 100.5 + 0.2 * Math.sin(s)));
    await t.feature.alarms.idle();
    const list = (await alarmsOf()).filter((a: { rule: string }) => a.rule === 'coolant_temp_high');
    expect(list).toHaveLength(1);
    const a = list[0];
    alarmId = a.id;
    expect(a).toMatchObject({ engineId: t.engineId, rule: 'coolant_temp_high', priority: 'medium', state: 'unacknowledged', unit: 'degC' });
    expect(new Date(a.raisedAt).getTime()).toBe(T0 + 70_000); // over the limit from 60 s, on-delay 10 s
    expect(a.value).toBeGreaterThan(98);
    expect(a.worstValue).toBeGreaterThanOrEqual(a.value);

    const mail = await waitFor(() => t.ctx.models.CaughtMail.findOne({ where: { to: t.users.technician.email } }), 10000);
    expect(mail.subject).toContain('Coolant temperature high');
    expect(mail.subject).toContain('Fire pump 1');
    expect(mail.text).toContain('Pump station North');
    expect(mail.text).toMatch(/Value: +\d+\.\d °C \(\d+\.\d °F\)/);
    expect(mail.text).toContain('Do not open the radiator or expansion-tank cap while the system is hot');
    expect(mail.text).toContain("engine maker's instructions");
    expect(mail.text).toContain(`http://jacketwatch.test/alarms/${a.id}`);

    // pushed to browsers on the alarms room and the site's alarm room for site-limited users (not mixed into the fleet's readings)
    const rooms = t.pushed.filter(([, ev, p]) => ev === 'alarm' && (p as { id: number }).id === a.id).map(([room]) => room);
    expect(rooms.length).toBeGreaterThan(0);
    expect(new Set(rooms)).toEqual(new Set(['alarms', `alarms:site:${t.siteId}`]));
  });

  it('keeps the worst value while active', async () => {
    t.feed(samples(t.engineId, T0 + 180_000, 20, () => 101.7));
    await t.feature.alarms.idle();
    const a = (await api().get(`/api/alarms/${alarmId}`).set(auth(t.tokens.operator)).expect(200)).body;
    expect(a.worstValue).toBeCloseTo(101.7, 5);
  });

  it('returns to normal after the off-delay, unacknowledged; acknowledging then closes it', async () => {
    t.feed(samples(t.engineId, T0 + 200_000, 60, () => 88));
    await t.feature.alarms.idle();
    let a = (await api().get(`/api/alarms/${alarmId}`).set(auth(t.tokens.operator)).expect(200)).body;
    expect(a.state).toBe('returned-unacknowledged');
    expect(a.active).toBe(false);
    expect(new Date(a.clearedAt).getTime()).toBe(T0 + 230_000);
    await api().post(`/api/alarms/${alarmId}/acknowledge`).set(auth(t.tokens.operator)).send({ note: 'seen on the local gauge' }).expect(200);
    a = (await api().get(`/api/alarms/${alarmId}`).set(auth(t.tokens.operator)).expect(200)).body;
    expect(a.state).toBe('normal');
    expect(a.closedAt).not.toBeNull();
    // in time order: the readings lie in the past, the e-mail went out when they arrived (now)
    expect(a.history.map((h: { event: string }) => h.event)).toEqual(['activate', 'clear', 'notified', 'acknowledge']);
    expect(a.history[3]).toMatchObject({
      fromState: 'returned-unacknowledged',
      toState: 'normal',
      userId: t.users.operator.id,
      note: 'seen on the local gauge',
    });
    // closed: no longer in the active list
    expect((await alarmsOf('active')).find((x: { id: number }) => x.id === alarmId)).toBeUndefined();
  });

  it('a new excursion after closing raises a new alarm; refused transitions answer 409', async () => {
    t.feed(samples(t.engineId, T0 + 300_000, 30, () => 100));
    await t.feature.alarms.idle();
    const open = (await alarmsOf('active')).filter((a: { rule: string }) => a.rule === 'coolant_temp_high');
    expect(open).toHaveLength(1);
    expect(open[0].id).not.toBe(alarmId);
    await api().post(`/api/alarms/${alarmId}/acknowledge`).set(auth(t.tokens.operator)).expect(409);
    await api().post(`/api/alarms/${open[0].id}/acknowledge`).set(auth(t.tokens.technician)).expect(200);
    const again = await api().post(`/api/alarms/${open[0].id}/acknowledge`).set(auth(t.tokens.technician)).expect(409);
    expect(again.body.error).toMatch(/already acknowledged/);
    // acknowledged and still active: clearing closes it
    t.feed(samples(t.engineId, T0 + 330_000, 45, () => 85));
    await t.feature.alarms.idle();
    expect((await api().get(`/api/alarms/${open[0].id}`).set(auth(t.tokens.operator)).expect(200)).body.state).toBe('normal');
  });

  it('does not chatter around the limit (deadband)', async () => {
    const before = (await alarmsOf()).length;
    // 97.3 .. 98.7 for ten minutes: in and out of the 98 °C limit, never back below 96 °C
    t.feed(samples(t.engineId, T0 + 400_000, 600, (s) => 98 + 0.7 * Math.sign(Math.sin(s / 5))));
    await t.feature.alarms.idle();
    const after = await alarmsOf();
    const raised = after.slice(0, after.length - before).filter((a: { rule: string }) => a.rule === 'coolant_temp_high');
    expect(raised).toHaveLength(1);
  });

  it('no data after silence, raised by the tick and cleared when data comes back', async () => {
    const last = T0 + 1_000_000;
    t.feed(samples(t.engineId, last - 30_000, 30, () => 85));
    t.feature.rules.tick(last + 30_000);
    await t.feature.alarms.idle();
    expect((await alarmsOf('active')).filter((a: { rule: string }) => a.rule === 'no_data')).toHaveLength(0);
    t.feature.rules.tick(last + 70_000);
    await t.feature.alarms.idle();
    const nd = (await alarmsOf('active')).filter((a: { rule: string }) => a.rule === 'no_data');
    expect(nd).toHaveLength(1);
    t.feed(samples(t.engineId, last + 80_000, 2, () => 85));
    await t.feature.alarms.idle();
    expect((await api().get(`/api/alarms/${nd[0].id}`).set(auth(t.tokens.operator)).expect(200)).body.state).toBe('returned-unacknowledged');
  });
});

describe('shelving and roles', () => {
  let id: number;
  beforeAll(async () => {
    // low pressure while running: a high-priority alarm
    t.feed(samples(t.engineId, T0 + 1_200_000, 40, () => 85, { kpa: 10 }));
    await t.feature.alarms.idle();
    id = (await alarmsOf('active')).find((a: { rule: string }) => a.rule === 'coolant_pressure_low_running').id;
  });

  it('an operator cannot shelve (403); shelving needs minutes and a reason (400)', async () => {
    await api().post(`/api/alarms/${id}/shelve`).set(auth(t.tokens.operator)).send({ minutes: 5, reason: 'x' }).expect(403);
    await api().post(`/api/alarms/${id}/shelve`).set(auth(t.tokens.technician)).send({ minutes: 5, reason: 'x' }).expect(403);
    const r = await api().post(`/api/alarms/${id}/shelve`).set(auth(t.tokens.planner)).send({ minutes: 5 }).expect(400);
    expect(r.body.field).toBe('reason');
    await api().post(`/api/alarms/${id}/shelve`).set(auth(t.tokens.planner)).send({ minutes: 0, reason: 'x' }).expect(400);
    await api().post(`/api/alarms/${id}/acknowledge`).expect(401);
  });

  it('a planner shelves it; it leaves the active list and comes back by itself when the shelf time ends', async () => {
    const r = await api()
      .post(`/api/alarms/${id}/shelve`)
      .set(auth(t.tokens.planner))
      .send({ minutes: 2, reason: 'pressure sensor being replaced' })
      .expect(200);
    expect(r.body.state).toBe('shelved');
    const until = new Date(r.body.shelvedUntil).getTime();
    expect(until - Date.now()).toBeGreaterThan(110_000);
    expect((await alarmsOf('active')).find((a: { id: number }) => a.id === id)).toBeUndefined();
    expect((await alarmsOf('shelved')).map((a: { id: number }) => a.id)).toContain(id);
    await api().post(`/api/alarms/${id}/shelve`).set(auth(t.tokens.planner)).send({ minutes: 2, reason: 'again' }).expect(409);
    await api().post(`/api/alarms/${id}/acknowledge`).set(auth(t.tokens.operator)).expect(409);

    await t.feature.alarms.housekeeping(until - 1000);
    expect((await api().get(`/api/alarms/${id}`).set(auth(t.tokens.operator))).body.state).toBe('shelved');
    await t.feature.alarms.housekeeping(until + 10);
    const back = (await api().get(`/api/alarms/${id}`).set(auth(t.tokens.operator))).body;
    expect(back.state).toBe('unacknowledged'); // the condition is still present
    expect(back.history.map((h: { event: string }) => h.event)).toEqual(expect.arrayContaining(['shelve', 'shelf-expired']));
  });

  it('notes are kept in the history', async () => {
    await api().post(`/api/alarms/${id}/notes`).set(auth(t.tokens.technician)).send({ note: 'hose clamp loose, tightened' }).expect(201);
    await api().post(`/api/alarms/${id}/notes`).set(auth(t.tokens.technician)).send({ note: '' }).expect(400);
    const a = (await api().get(`/api/alarms/${id}`).set(auth(t.tokens.operator))).body;
    expect(a.history.find((h: { event: string }) => h.event === 'note')).toMatchObject({ note: 'hose clamp loose, tightened', userId: t.users.technician.id });
  });

  it('summary counts open alarms by state; performance counts activations', async () => {
    const s = (await api().get('/api/alarms/summary').set(auth(t.tokens.operator)).expect(200)).body;
    expect(s.byState.unacknowledged).toBeGreaterThanOrEqual(1);
    expect(s.flood.flooding).toBe(false);
    const p = (
      await api()
        .get(`/api/alarms/performance?from=${T0 - 1000}&to=${Date.now() + 1000}`)
        .set(auth(t.tokens.operator))
        .expect(200)
    ).body;
    expect(p.total).toBeGreaterThanOrEqual(5);
    expect(p.mostFrequent[0].key).toContain('Fire pump 1/');
  });

  it('admin-only views: mail, outbox, rules', async () => {
    await api().get('/api/admin/mail').set(auth(t.tokens.planner)).expect(403);
    const mail = (await api().get('/api/admin/mail').set(auth(t.tokens.admin)).expect(200)).body;
    expect(mail[0]).toEqual(
      expect.objectContaining({
        id: expect.any(Number),
        to: expect.any(String),
        subject: expect.any(String),
        receivedAt: expect.any(String),
        text: expect.any(String),
      }),
    );
    // the outbox sends on its own clock: wait until every message is delivered rather than expect it at once
    const out = await waitFor(
      async () => {
        const rows = (await api().get('/api/admin/outbox').set(auth(t.tokens.admin)).expect(200)).body as { sentAt: string | null }[];
        return rows.length > 0 && rows.every((m) => m.sentAt !== null) && rows;
      },
      15000,
      200,
    );
    expect(out.length).toBeGreaterThan(0);
    await api().get('/api/rules').set(auth(t.tokens.operator)).expect(403);
    const rules = (await api().get('/api/rules').set(auth(t.tokens.admin)).expect(200)).body.rules;
    expect(rules.map((r: { key: string }) => r.key)).toEqual(
      expect.arrayContaining(['coolant_temp_high', 'no_data', 'boiling_margin_low', 'conductivity_high']),
    );
  });
});

describe('on-call rota routes', () => {
  it('planners change the rota, technicians only read it', async () => {
    const body = {
      siteId: t.siteId,
      userId: t.users.backup.id,
      backupUserId: t.users.technician.id,
      startsAt: new Date(Date.now() + 86400_000).toISOString(),
      endsAt: new Date(Date.now() + 2 * 86400_000).toISOString(),
    };
    await api().post('/api/oncall').set(auth(t.tokens.technician)).send(body).expect(403);
    const created = (await api().post('/api/oncall').set(auth(t.tokens.planner)).send(body).expect(201)).body;
    expect(created).toMatchObject({ siteId: t.siteId, userId: t.users.backup.id, userName: 'Test backup' });
    await api()
      .post('/api/oncall')
      .set(auth(t.tokens.planner))
      .send({ ...body, endsAt: body.startsAt })
      .expect(400);
    await api()
      .post('/api/oncall')
      .set(auth(t.tokens.planner))
      .send({ ...body, userId: t.users.operator.id })
      .expect(400);
    await api().patch(`/api/oncall/${created.id}`).set(auth(t.tokens.planner)).send({ backupUserId: null }).expect(200);
    const list = (await api().get(`/api/oncall?siteId=${t.siteId}`).set(auth(t.tokens.technician)).expect(200)).body;
    expect(list).toHaveLength(2);
    await api().delete(`/api/oncall/${created.id}`).set(auth(t.tokens.planner)).expect(204);
    await api().delete(`/api/oncall/${created.id}`).set(auth(t.tokens.planner)).expect(404);
  });
});

describe('people for the rota', () => {
  it('planners and admins list people by role, read-only; others are refused; disabled accounts are left out', async () => {
    await api().get('/api/people').expect(401);
    await api().get('/api/people').set(auth(t.tokens.operator)).expect(403);
    await api().get('/api/people').set(auth(t.tokens.technician)).expect(403);
    const techs = (await api().get('/api/people?role=technician').set(auth(t.tokens.planner)).expect(200)).body;
    expect(techs).toEqual([
      { id: t.users.backup.id, name: 'Test backup', email: t.users.backup.email, role: 'technician' },
      { id: t.users.technician.id, name: 'Test technician', email: t.users.technician.email, role: 'technician' },
    ]);
    expect(Object.keys(techs[0]).sort()).toEqual(['email', 'id', 'name', 'role']); // no hash, no flags
    const both = (await api().get('/api/people?role=technician,planner').set(auth(t.tokens.admin)).expect(200)).body;
    expect(new Set(both.map((p: { role: string }) => p.role))).toEqual(new Set(['technician', 'planner']));
    const bad = await api().get('/api/people?role=boss').set(auth(t.tokens.planner)).expect(400);
    expect(bad.body.field).toMatch(/^role/);
    await api().post('/api/people').set(auth(t.tokens.planner)).send({ name: 'x' }).expect(404);

    await t.ctx.models.User.update({ disabled: true }, { where: { id: t.users.backup.id } });
    try {
      const now = (await api().get('/api/people?role=technician').set(auth(t.tokens.planner)).expect(200)).body;
      expect(now.map((p: { id: number }) => p.id)).toEqual([t.users.technician.id]);
    } finally {
      await t.ctx.models.User.update({ disabled: false }, { where: { id: t.users.backup.id } });
    }
  });
});

describe('engine overrides, out of service and the preview', () => {
  it('an engine out of service raises nothing and its open alarms leave annunciation', async () => {
    await t.ctx.models.Engine.update({ outOfService: true }, { where: { id: t.engineId } });
    await t.feature.rules.refreshEngines();
    await t.feature.alarms.idle();
    expect(await alarmsOf('active')).toHaveLength(0);
    const before = (await alarmsOf()).length;
    t.feed(samples(t.engineId, T0 + 1_400_000, 60, () => 110));
    await t.feature.alarms.idle();
    expect((await alarmsOf()).length).toBe(before);
    await t.ctx.models.Engine.update({ outOfService: false }, { where: { id: t.engineId } });
    await t.feature.rules.refreshEngines();
    await t.feature.alarms.idle();
  });

  it('an admin override changes the limit; the preview replays stored readings', async () => {
    const engineId = t.engineId;
    await api().put(`/api/rules/engines/${engineId}`).set(auth(t.tokens.planner)).send({ rules: [] }).expect(403);
    await api()
      .put(`/api/rules/engines/${engineId}`)
      .set(auth(t.tokens.admin))
      .send({ rules: [{ rule: 'nonsense', enabled: true }] })
      .expect(400);
    const r = (
      await api()
        .put(`/api/rules/engines/${engineId}`)
        .set(auth(t.tokens.admin))
        .send({ rules: [{ rule: 'coolant_temp_high', params: { limit: 92 } }] })
        .expect(200)
    ).body;
    expect(r.rules.find((x: { key: string }) => x.key === 'coolant_temp_high')).toMatchObject({
      overridden: true,
      params: expect.objectContaining({ limit: 92, deadband: 2 }),
    });

    // two hours of stored readings: one excursion to 95 °C for 5 minutes
    const start = Date.now() - 3 * 3600_000;
    const rows: string[] = [];
    for (let s = 0; s < 7200; s += 5) {
      const ts = start + s * 1000;
      const temp = s >= 3000 && s < 3300 ? 95 : 84;
      rows.push(`(${engineId}, ${CHANNELS.coolant_temp.code}, ${ts}, ${temp}, 0)`, `(${engineId}, ${CHANNELS.engine_speed.code}, ${ts}, 1800, 0)`);
    }
    for (let i = 0; i < rows.length; i += 400)
      await t.ctx.sequelize.query(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${rows.slice(i, i + 400).join(',')}`);

    const from = start - 1000;
    const to = start + 7200_000;
    const p = (await api().post('/api/rules/preview').set(auth(t.tokens.admin)).send({ engineId, rule: 'coolant_temp_high', from, to }).expect(200)).body;
    expect(p.readings).toBe(rows.length);
    expect(p.alarms).toHaveLength(1);
    expect(new Date(p.alarms[0].raisedAt).getTime()).toBe(start + 3010_000);
    // with the profile's 98 °C the same data raises nothing
    const p98 = (
      await api()
        .post('/api/rules/preview')
        .set(auth(t.tokens.admin))
        .send({ engineId, rule: 'coolant_temp_high', params: { limit: 98 }, from, to })
        .expect(200)
    ).body;
    expect(p98.alarms).toHaveLength(0);
    // the same history once compacted (server/services/history, as if a day had passed): the same preview
    const pass = await startCompactor({
      sequelize: t.ctx.sequelize,
      log: t.ctx.log,
      config: { compactAfterH: 24 },
      now: () => Date.now() + 28 * 3600_000,
      pauseMs: 0,
      timer: false,
    }).pass();
    expect(pass.readings).toBeGreaterThanOrEqual(rows.length - 2);
    const again = (await api().post('/api/rules/preview').set(auth(t.tokens.admin)).send({ engineId, rule: 'coolant_temp_high', from, to }).expect(200)).body;
    expect(again).toEqual(p);
    await api()
      .post('/api/rules/preview')
      .set(auth(t.tokens.admin))
      .send({ engineId, rule: 'coolant_temp_high', from: to - 8 * 86400_000, to })
      .expect(400);
  });
});
