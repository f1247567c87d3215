import type { Sequelize } from 'sequelize';
import { Alarm, initAlarm } from './alarm';
import { AlarmEvent, initAlarmEvent } from './alarm-event';
import { CaughtMail, initCaughtMail } from './caught-mail';
import { EngineBaseline, initEngineBaseline } from './engine-baseline';
import { EngineRule, initEngineRule } from './engine-rule';
import { OncallShift, initOncallShift } from './oncall-shift';
import { OutboxMessage, initOutboxMessage } from './outbox-message';
import { RuleProfile, initRuleProfile } from './rule-profile';

/** Models of the alarms issue (migration 0002): alarms, their history, rules, rota, mail. */
export interface AlarmModels {
  Alarm: typeof Alarm;
  AlarmEvent: typeof AlarmEvent;
  RuleProfile: typeof RuleProfile;
  EngineRule: typeof EngineRule;
  OncallShift: typeof OncallShift;
  EngineBaseline: typeof EngineBaseline;
  OutboxMessage: typeof OutboxMessage;
  CaughtMail: typeof CaughtMail;
}

export function initAlarmModels(sequelize: Sequelize): AlarmModels {
  const m: AlarmModels = {
    Alarm: initAlarm(sequelize),
    AlarmEvent: initAlarmEvent(sequelize),
    RuleProfile: initRuleProfile(sequelize),
    EngineRule: initEngineRule(sequelize),
    OncallShift: initOncallShift(sequelize),
    EngineBaseline: initEngineBaseline(sequelize),
    OutboxMessage: initOutboxMessage(sequelize),
    CaughtMail: initCaughtMail(sequelize),
  };
  m.Alarm.hasMany(m.AlarmEvent, { foreignKey: 'alarmId', as: 'events' });
  m.AlarmEvent.belongsTo(m.Alarm, { foreignKey: 'alarmId', as: 'alarm' });
  return m;
}

export { Alarm, AlarmEvent, CaughtMail, EngineBaseline, EngineRule, OncallShift, OutboxMessage, RuleProfile };
