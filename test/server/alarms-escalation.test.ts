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
  expect(await mailTo(t.users.backup.email)).toBe(0);
  const toBackup = await waitFor(() => t.ctx.models.CaughtMail.findOne({ where: { to: t.users.backup.email, subject: VERY_HIGH } }), 15000);
  expect(toBackup.subject).toMatch(/^Not yet acknowledged: HIGH alarm: Coolant temperature very high/);
  expect(toBackup.text).toContain('backup on call');
  const toPlanner = await waitFor(() => t.ctx.models.CaughtMail.findOne({ where: { to: t.users.planner.email, subject: VERY_HIGH } }), 15000);
  expect(toPlanner.text).toContain(`/alarms/${alarm.id}`);

  const detail = (await request(t.app).get(`/api/alarms/${alarm.id}`).set(auth(t.tokens.operator))).body;
  expect(detail.escalationLevel).toBe(2);
  expect(detail.history.map((h: { event: string }) => h.event).filter((e: string) => e !== 'activate')).toEqual(
    expect.arrayContaining(['notified', 'escalated', 'escalated']),
  );

  // the technician acknowledges: no more e-mail for this alarm
  await request(t.app).post(`/api/alarms/${alarm.id}/acknowledge`).set(auth(t.tokens.technician)).expect(200);
  const before = await t.ctx.models.OutboxMessage.count({ where: { alarmId: alarm.id } });
  await new Promise((r) => setTimeout(r, 2500));
  expect(await t.ctx.models.OutboxMessage.count({ where: { alarmId: alarm.id } })).toBe(before);
  // each person got it once: technician, backup, planner
  expect(before).toBe(3);
});
