/**
 * Escalation when nobody acknowledges: on call -> backup -> planners, with a short escalation time
 * and the real clock tick; acknowledging stops it. E-mail goes over real SMTP into the mail catcher.
 */
import { Op } from 'sequelize';
import request from 'supertest';
import { waitFor } from './support/alarm-db';
import { auth, makeAlarmApp, samples, type AlarmApp } from './support/alarm-app';

let t: AlarmApp;
beforeAll(async () => {
  t = await makeAlarmApp({ escalateAfterMs: 1500, tickMs: 200 });
});
afterAll(async () => t.close());

// several rules fire at 106 °C; follow the very-high one
const VERY_HIGH = { [Op.like]: '%Coolant temperature very high%' };
const mailTo = (email: string) => t.ctx.models.CaughtMail.count({ where: { to: email, subject: VERY_HIGH } });

it('escalates to the backup, then the planners, and stops once acknowledged', async () => {
  // readings up to now, so the no-data rule stays quiet for the test's few seconds
  const t0 = Date.now() - 40_000;
  t.feed(samples(t.engineId, t0, 40, () => 106, { kpa: 90 }));
  await t.feature.alarms.idle();
  const alarm = (await request(t.app).get(`/api/alarms?engineId=${t.engineId}`).set(auth(t.tokens.operator))).body.find(
    (a: { rule: string }) => a.rule === 'coolant_temp_very_high',
  );
  expect(alarm).toMatchObject({ priority: 'high', state: 'unacknowledged' });

  await waitFor(async () => (await mailTo(t.users.technician.email)) > 0, 10000);
  const toBackup = await waitFor(() => t.ctx.models.CaughtMail.findOne({ where: { to: t.users.backup.email, subject: VERY_HIGH } }), 15000);
  expect(toBackup.subject).toMatch(/^Not yet acknowledged: HIGH alarm: Coolant temperature very high/);
  expect(toBackup.text).toContain('backup on call');
  const toPlanner = await waitFor(() => t.ctx.models.CaughtMail.findOne({ where: { to: t.users.planner.email, subject: VERY_HIGH } }), 15000);
  expect(toPlanner.text).toContain(`/alarms/${alarm.id}`);

  // the mail can be caught before the level is written (the outbox sends as soon as the mail is queued):
  // wait for the level itself
  const detail = await waitFor(async () => {
    const d = (await request(t.app).get(`/api/alarms/${alarm.id}`).set(auth(t.tokens.operator))).body;
    return d.escalationLevel === 2 && d;
  }, 10000);
  expect(detail.history.map((h: { event: string }) => h.event).filter((e: string) => e !== 'activate')).toEqual(
    expect.arrayContaining(['notified', 'escalated', 'escalated']),
  );

  // the technician acknowledges: a housekeeping round long after the escalation time sends nothing more
  await request(t.app).post(`/api/alarms/${alarm.id}/acknowledge`).set(auth(t.tokens.technician)).expect(200);
  const before = await t.ctx.models.OutboxMessage.count({ where: { alarmId: alarm.id } });
  await t.feature.alarms.housekeeping(Date.now() + 60 * 60_000);
  expect(await t.ctx.models.OutboxMessage.count({ where: { alarmId: alarm.id } })).toBe(before);
  // each person got it once, in the order of the levels: technician, backup, planner
  const queued = await t.ctx.models.OutboxMessage.findAll({ where: { alarmId: alarm.id }, order: [['id', 'ASC']] });
  expect(queued.map((o) => o.to)).toEqual([t.users.technician.email, t.users.backup.email, t.users.planner.email]);
});
