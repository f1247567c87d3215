import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Work orders and what hangs off them: checklist steps, history, parts and fluids, attachments,
 * amendments (appended after close), the audit log (overrides, sign-offs) and service events
 * (what the service plan reads). Portable queryInterface calls only (SQLite and PostgreSQL).
 *
 * Status is stored as text: requested | planned | in-progress | waiting-sign-off | closed | cancelled
 * (transitions in server/services/work-orders/transitions.ts).
 */
const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const ts = { created_at: { type: DataTypes.DATE, allowNull: false }, updated_at: { type: DataTypes.DATE, allowNull: false } };
const userRef = (allowNull: boolean) => ({ type: DataTypes.INTEGER, allowNull, references: { model: 'users', key: 'id' } });
const orderRef = { type: DataTypes.INTEGER, allowNull: false, references: { model: 'work_orders', key: 'id' }, onDelete: 'CASCADE' };

export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.createTable('work_orders', {
    id,
    engine_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'engines', key: 'id' } },
    kind: { type: DataTypes.STRING(32), allowNull: false },
    title: { type: DataTypes.STRING(200), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: true },
    priority: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'medium' },
    due_date: { type: DataTypes.DATEONLY, allowNull: true },
    assignee_id: userRef(true),
    status: { type: DataTypes.STRING(20), allowNull: false },
    created_by: userRef(false),
    requested_by: userRef(true),
    started_at: { type: DataTypes.DATE, allowNull: true },
    completed_at: { type: DataTypes.DATE, allowNull: true },
    signed_off_by: userRef(true),
    signed_off_at: { type: DataTypes.DATE, allowNull: true },
    closed_at: { type: DataTypes.DATE, allowNull: true },
    ...ts,
  });
  await q.addIndex('work_orders', ['status', 'due_date'], { name: 'work_orders_status_due' });
  await q.addIndex('work_orders', ['engine_id'], { name: 'work_orders_engine' });
  await q.addIndex('work_orders', ['assignee_id'], { name: 'work_orders_assignee' });

  await q.createTable('work_order_alarms', {
    work_order_id: { ...orderRef, primaryKey: true },
    alarm_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true, references: { model: 'alarms', key: 'id' }, onDelete: 'CASCADE' },
  });

  await q.createTable('work_order_steps', {
    id,
    work_order_id: orderRef,
    position: { type: DataTypes.INTEGER, allowNull: false },
    key: { type: DataTypes.STRING(40), allowNull: false },
    title: { type: DataTypes.STRING(300), allowNull: false },
    detail: { type: DataTypes.TEXT, allowNull: true },
    /** value (a number with a unit) | photo | confirmation */
    input: { type: DataTypes.STRING(16), allowNull: false },
    unit: { type: DataTypes.STRING(16), allowNull: true },
    optional: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    gated: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    caution: { type: DataTypes.TEXT, allowNull: true },
    result_value: { type: DataTypes.DOUBLE, allowNull: true },
    result_unit: { type: DataTypes.STRING(16), allowNull: true },
    result_text: { type: DataTypes.STRING(1000), allowNull: true },
    lockout_confirmed: { type: DataTypes.BOOLEAN, allowNull: true },
    /** The opening check as the server computed it when the step was done (the record's evidence). */
    gate_snapshot: { type: DataTypes.JSON, allowNull: true },
    /** Gauge, temperature and time since stop read by hand when live data was stale. */
    manual_check: { type: DataTypes.JSON, allowNull: true },
    done_at: { type: DataTypes.DATE, allowNull: true },
    done_by: userRef(true),
  });
  await q.addIndex('work_order_steps', ['work_order_id', 'position'], { unique: true, name: 'work_order_steps_order_pos' });

  await q.createTable('work_order_events', {
    id,
    work_order_id: orderRef,
    at: { type: DataTypes.DATE, allowNull: false },
    user_id: userRef(true),
    event: { type: DataTypes.STRING(32), allowNull: false },
    from_status: { type: DataTypes.STRING(20), allowNull: true },
    to_status: { type: DataTypes.STRING(20), allowNull: true },
    note: { type: DataTypes.STRING(2000), allowNull: true },
    details: { type: DataTypes.JSON, allowNull: true },
  });
  await q.addIndex('work_order_events', ['work_order_id', 'at'], { name: 'work_order_events_order_at' });

  await q.createTable('work_order_parts', {
    id,
    work_order_id: orderRef,
    /** filter-charged | filter-blank | additive | coolant | other */
    kind: { type: DataTypes.STRING(20), allowNull: false },
    description: { type: DataTypes.STRING(300), allowNull: true },
    /** SI: litres for fluids, a count for filters and other parts. */
    quantity: { type: DataTypes.DOUBLE, allowNull: false },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    added_by: userRef(false),
    created_at: { type: DataTypes.DATE, allowNull: false },
  });

  await q.createTable('attachments', {
    id,
    work_order_id: orderRef,
    step_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'work_order_steps', key: 'id' }, onDelete: 'SET NULL' },
    stored_name: { type: DataTypes.STRING(80), allowNull: false, unique: true },
    original_name: { type: DataTypes.STRING(255), allowNull: false },
    content_type: { type: DataTypes.STRING(64), allowNull: false },
    size: { type: DataTypes.INTEGER, allowNull: false },
    uploaded_by: userRef(false),
    created_at: { type: DataTypes.DATE, allowNull: false },
  });

  await q.createTable('amendments', {
    id,
    work_order_id: orderRef,
    text: { type: DataTypes.TEXT, allowNull: false },
    author_id: userRef(false),
    created_at: { type: DataTypes.DATE, allowNull: false },
  });

  await q.createTable('audit_log', {
    id,
    at: { type: DataTypes.DATE, allowNull: false },
    user_id: userRef(true),
    action: { type: DataTypes.STRING(40), allowNull: false },
    entity: { type: DataTypes.STRING(40), allowNull: false },
    entity_id: { type: DataTypes.INTEGER, allowNull: true },
    details: { type: DataTypes.JSON, allowNull: true },
  });
  await q.addIndex('audit_log', ['entity', 'entity_id'], { name: 'audit_log_entity' });

  await q.createTable('service_events', {
    id,
    engine_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'engines', key: 'id' }, onDelete: 'CASCADE' },
    task_key: { type: DataTypes.STRING(40), allowNull: false },
    done_at: { type: DataTypes.DATE, allowNull: false },
    run_hours: { type: DataTypes.DOUBLE, allowNull: true },
    work_order_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'work_orders', key: 'id' }, onDelete: 'SET NULL' },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('service_events', ['engine_id', 'task_key', 'done_at'], { name: 'service_events_engine_task' });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  for (const t of [
    'service_events',
    'audit_log',
    'amendments',
    'attachments',
    'work_order_parts',
    'work_order_events',
    'work_order_steps',
    'work_order_alarms',
    'work_orders',
  ]) {
    await q.dropTable(t);
  }
}
