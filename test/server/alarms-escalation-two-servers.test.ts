/**
 * Two servers' alarm features on one database (several servers): both run housekeeping every 200 ms, and an
 * alarm nobody acknowledges is escalated once per level, not once per server, because each escalation is
 * claimed by a conditional update before it is sent. Real SMTP into each server's mail catcher.
 */
import { Op } from 'sequelize';
import { createAlarmFeature, type AlarmFeature } from '../../server/services/alarms';
import { loadAlarmSettings } from '../../server/services/alarms/alarm-settings';
import { waitFor } from './support/alarm-db';
import { makeAlarmApp, samples, type AlarmApp } from './support/alarm-app';

const settings = { escalateAfterMs: 1500, tickMs: 200, mailRetryBaseMs: 200, mailRetryMaxMs: 1000 };
let t: AlarmApp;
let second: AlarmFeature;

beforeAll(async () => {
  t = await makeAlarmApp(settings);
  second = createAlarmFeature(t.ctx, { ...loadAlarmSettings({}), ...settings });
  await second.start({
    onReadings: () => undefined,
    emit: () => undefined,
    liveState: { latest: () => ({}), lastSeen: () => null, runState: () => 'no-data' },
  });
});
afterAll(async () => {
  await second?.stop();
  await t?.close();
});

const VERY_HIGH = { [Op.like]: '%Coolant temperature very high%' };

it('each escalation of an unacknowledged alarm is sent once, though two servers run housekeeping', async () => {
  const t0 = Date.now() - 40_000;
  t.feed(samples(t.engineId, t0, 40, () => 106, { kpa: 90 }));
  await t.feature.alarms.idle();
  const alarm = await waitFor(() => t.ctx.models.Alarm.findOne({ where: { rule: 'coolant_temp_very_high' } }), 10000);
  // both servers see it due; the planners' level is the last one
  await waitFor(async () => (await t.ctx.models.Alarm.findByPk(alarm.id))!.escalationLevel === 2 || null, 20000);
  await t.feature.alarms.idle();
  await second.alarms.idle();
  const sent = await t.ctx.models.OutboxMessage.findAll({ where: { alarmId: alarm.id }, order: [['id', 'ASC']] });
  expect(sent.map((m) => m.to)).toEqual([t.users.technician.email, t.users.backup.email, t.users.planner.email]);
  const events = await t.ctx.models.AlarmEvent.findAll({ where: { alarmId: alarm.id, event: { [Op.in]: ['notified', 'escalated'] } }, order: [['id', 'ASC']] });
  expect(events.map((e) => e.event)).toEqual(['notified', 'escalated', 'escalated']);
  await waitFor(async () => (await t.ctx.models.CaughtMail.count({ where: { subject: VERY_HIGH } })) === 3 || null, 10000);
});
