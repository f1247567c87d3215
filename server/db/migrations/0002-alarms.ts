import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Alarms, their history, rule profiles and per-engine overrides, the on-call rota, the mail outbox and
 * the local mail catcher's store. Portable queryInterface calls only (SQLite and PostgreSQL).
 * The default rule profile is written at start by the rule engine (so its defaults can evolve with the code).
 *
 * Priority is stored as text: 'low' | 'medium' | 'high' | 'urgent' (ranked in that order;
 * see server/services/alarms/priority.ts).
 */
const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const ts = { created_at: { type: DataTypes.DATE, allowNull: false }, updated_at: { type: DataTypes.DATE, allowNull: false } };
const engineRef = { type: DataTypes.INTEGER, allowNull: false, references: { model: 'engines', key: 'id' }, onDelete: 'CASCADE' };
const userRef = (allowNull: boolean) => ({ type: DataTypes.INTEGER, allowNull, references: { model: 'users', key: 'id' } });

export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.createTable('rule_profiles', {
    id,
    name: { type: DataTypes.STRING(80), allowNull: false, unique: true },
    is_default: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    rules: { type: DataTypes.JSON, allowNull: false },
    ...ts,
  });
  await q.createTable('engine_rules', {
    id,
    engine_id: engineRef,
    rule: { type: DataTypes.STRING(40), allowNull: false },
    params: { type: DataTypes.JSON, allowNull: true },
    enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    ...ts,
  });
  await q.addIndex('engine_rules', ['engine_id', 'rule'], { unique: true, name: 'engine_rules_engine_rule' });

  await q.createTable('alarms', {
    id,
    engine_id: engineRef,
    rule: { type: DataTypes.STRING(40), allowNull: false },
    priority: { type: DataTypes.STRING(8), allowNull: false },
    state: { type: DataTypes.STRING(32), allowNull: false },
    /** Condition still present (the rule's latest verdict), independent of acknowledgement. */
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    raised_at: { type: DataTypes.DATE, allowNull: false },
    value: { type: DataTypes.DOUBLE, allowNull: true },
    worst_value: { type: DataTypes.DOUBLE, allowNull: true },
    unit: { type: DataTypes.STRING(16), allowNull: true },
    message: { type: DataTypes.STRING(500), allowNull: false },
    acknowledged_at: { type: DataTypes.DATE, allowNull: true },
    acknowledged_by: userRef(true),
    note: { type: DataTypes.STRING(1000), allowNull: true },
    shelved_until: { type: DataTypes.DATE, allowNull: true },
    shelve_reason: { type: DataTypes.STRING(500), allowNull: true },
    shelved_by: userRef(true),
    cleared_at: { type: DataTypes.DATE, allowNull: true },
    /** Set when the alarm is finished (returned to normal and acknowledged): frees (engine, rule) for a new one. */
    closed_at: { type: DataTypes.DATE, allowNull: true },
    escalation_level: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    last_notified_at: { type: DataTypes.DATE, allowNull: true },
    ...ts,
  });
  // at most one open alarm per (engine, rule)
  await q.addIndex('alarms', ['engine_id', 'rule'], { unique: true, name: 'alarms_one_open_per_rule', where: { closed_at: null } });
  await q.addIndex('alarms', ['raised_at'], { name: 'alarms_raised_at' });
  await q.addIndex('alarms', ['state'], { name: 'alarms_state' });

  await q.createTable('alarm_events', {
    id,
    alarm_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'alarms', key: 'id' }, onDelete: 'CASCADE' },
    at: { type: DataTypes.DATE, allowNull: false },
    event: { type: DataTypes.STRING(32), allowNull: false },
    from_state: { type: DataTypes.STRING(32), allowNull: true },
    to_state: { type: DataTypes.STRING(32), allowNull: true },
    user_id: userRef(true),
    value: { type: DataTypes.DOUBLE, allowNull: true },
    note: { type: DataTypes.STRING(1000), allowNull: true },
  });
  await q.addIndex('alarm_events', ['alarm_id', 'at'], { name: 'alarm_events_alarm_at' });

  await q.createTable('oncall_shifts', {
    id,
    site_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'sites', key: 'id' }, onDelete: 'CASCADE' },
    user_id: userRef(false),
    backup_user_id: userRef(true),
    starts_at: { type: DataTypes.DATE, allowNull: false },
    ends_at: { type: DataTypes.DATE, allowNull: false },
    ...ts,
  });
  await q.addIndex('oncall_shifts', ['site_id', 'starts_at'], { name: 'oncall_shifts_site_start' });

  await q.createTable('engine_baselines', {
    id,
    engine_id: engineRef,
    channel: { type: DataTypes.STRING(32), allowNull: false, defaultValue: 'coolant_conductivity' },
    baseline_from: { type: DataTypes.DATE, allowNull: false },
    value: { type: DataTypes.DOUBLE, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('engine_baselines', ['engine_id', 'channel', 'baseline_from'], { name: 'engine_baselines_engine' });

  await q.createTable('outbox', {
    id,
    to: { type: DataTypes.STRING(1000), allowNull: false },
    subject: { type: DataTypes.STRING(300), allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    html: { type: DataTypes.TEXT, allowNull: true },
    alarm_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'alarms', key: 'id' }, onDelete: 'SET NULL' },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    next_attempt_at: { type: DataTypes.DATE, allowNull: false },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    last_error: { type: DataTypes.STRING(1000), allowNull: true },
    ...ts,
  });
  await q.addIndex('outbox', ['sent_at', 'next_attempt_at'], { name: 'outbox_due' });

  await q.createTable('caught_mail', {
    id,
    to: { type: DataTypes.STRING(1000), allowNull: false },
    from: { type: DataTypes.STRING(300), allowNull: true },
    subject: { type: DataTypes.STRING(300), allowNull: true },
    text: { type: DataTypes.TEXT, allowNull: true },
    html: { type: DataTypes.TEXT, allowNull: true },
    message_id: { type: DataTypes.STRING(300), allowNull: true },
    received_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('caught_mail', ['received_at'], { name: 'caught_mail_received' });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  for (const t of ['caught_mail', 'outbox', 'engine_baselines', 'oncall_shifts', 'alarm_events', 'alarms', 'engine_rules', 'rule_profiles']) {
    await q.dropTable(t);
  }
}
