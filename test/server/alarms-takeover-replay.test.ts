/**
 * Several servers: a server that takes an engine over rebuilds its rules from stored readings over the
 * longest span its rules look back, not a fixed 10 minutes. A standby engine whose heater failed 35
 * minutes ago (jacket water falling steadily, 30-minute window) is found by the new owner at once, as
 * the previous owner would have found it. Real database, real alarm service, the server's own history query.
 */
import { EngineDirectory } from '../../server/services/alarms/engine-directory';
import { REPLAY_MIN_MS, replayMsFor, DEFAULT_RULES } from '../../server/services/alarms/rule-definitions';
import { RuleEngine } from '../../server/services/alarms/rule-engine';
import { storedReadings } from '../../server/services/alarms/stored-readings';
import { CHANNELS } from '../../shared/channels';
import { makeAlarmApp, type AlarmApp } from './support/alarm-app';
import { quietLog } from './support/alarm-db';

let t: AlarmApp;

beforeAll(async () => {
  t = await makeAlarmApp();
});
afterAll(async () => {
  await t?.close();
});

test('the replay spans the longest rule window (heater loss: 30 min), bounded', () => {
  expect(replayMsFor(DEFAULT_RULES)).toBeGreaterThanOrEqual(31 * 60_000);
  expect(replayMsFor([{ ...DEFAULT_RULES[0], params: { windowS: 60, onDelayS: 10, offDelayS: 30 } }])).toBe(REPLAY_MIN_MS);
  expect(replayMsFor(DEFAULT_RULES.map((r) => ({ ...r, enabled: false })))).toBe(REPLAY_MIN_MS);
  const huge = { ...DEFAULT_RULES[0], params: { windowS: 7 * 86_400 } };
  expect(replayMsFor([huge])).toBe(2 * 60 * 60_000);
});

test('a new owner raises "heater not holding" from 35 minutes of stored history', async () => {
  const { models, sequelize } = t.ctx;
  await models.Engine.update({ duty: 'standby', heaterSetpointC: 40 }, { where: { id: t.engineId } });
  // stored by the previous owner: stopped, jacket water falling from 36.5 to 32 °C over 35 minutes, one sample every 20 s
  const now = Date.now();
  const rows: string[] = [];
  for (let s = 35 * 60; s >= 0; s -= 20) {
    const ts = now - s * 1000;
    const temp = 32 + (4.5 * s) / (35 * 60);
    rows.push(`(${t.engineId}, ${CHANNELS.engine_speed.code}, ${ts}, 0, 0)`, `(${t.engineId}, ${CHANNELS.coolant_temp.code}, ${ts}, ${temp.toFixed(3)}, 0)`);
  }
  await sequelize.query(`INSERT INTO readings (engine_id, channel, ts, value, quality) VALUES ${rows.join(', ')}`);

  let owned = false;
  const rules = new RuleEngine({
    models,
    log: quietLog,
    directory: new EngineDirectory(models),
    alarms: t.feature.alarms,
    lastSeen: () => null,
    lateAfterMs: 120_000,
    owns: () => owned,
    storedReadings: (ids, since) => storedReadings(sequelize, ids, since),
  });
  await rules.load();
  owned = true; // the lease arrives
  await rules.adopt();
  await t.feature.alarms.idle();
  const alarm = await models.Alarm.findOne({ where: { engineId: t.engineId, rule: 'heater_not_holding' } });
  expect(alarm).not.toBeNull();
  expect(alarm!.active).toBe(true);
});
