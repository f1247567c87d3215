import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Coolant chemistry and service planning: coolant tests (with the stored additive decision), the additive
 * profile (strength of the liquid additive and filter pre-charges; no brand names), per-engine service-plan
 * overrides and the audit trail of hand corrections to run hours. Portable queryInterface calls only.
 */
const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const ts = { created_at: { type: DataTypes.DATE, allowNull: false }, updated_at: { type: DataTypes.DATE, allowNull: false } };
const engineRef = { type: DataTypes.INTEGER, allowNull: false, references: { model: 'engines', key: 'id' }, onDelete: 'CASCADE' };
const userRef = (allowNull: boolean) => ({ type: DataTypes.INTEGER, allowNull, references: { model: 'users', key: 'id' } });
const real = { type: DataTypes.DOUBLE, allowNull: true };

export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.createTable('coolant_tests', {
    id,
    engine_id: engineRef,
    tested_at: { type: DataTypes.DATE, allowNull: false },
    /** strip | refractometer | lab */
    method: { type: DataTypes.STRING(16), allowNull: false },
    sca_units_per_gal: real,
    glycol_percent: real,
    freeze_point_c: real,
    ph: real,
    conductivity_us_cm: real,
    appearance: { type: DataTypes.STRING(200), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: true },
    tested_by: userRef(true),
    decision: { type: DataTypes.JSON, allowNull: true },
    /** manual | lab-import */
    source: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'manual' },
    ...ts,
  });
  await q.addIndex('coolant_tests', ['engine_id', 'tested_at'], { name: 'coolant_tests_engine_time' });

  await q.createTable('additive_profiles', {
    id,
    name: { type: DataTypes.STRING(80), allowNull: false },
    liquid_units_per_litre: { type: DataTypes.DOUBLE, allowNull: false },
    /** [{ label, prechargeUnits }] */
    filter_sizes: { type: DataTypes.JSON, allowNull: false },
    sca_low: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1.2 },
    sca_high: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 3.0 },
    updated_by: userRef(true),
    ...ts,
  });

  await q.createTable('service_tasks', {
    id,
    engine_id: engineRef,
    task_key: { type: DataTypes.STRING(40), allowNull: false },
    title: { type: DataTypes.STRING(200), allowNull: true },
    every_hours: real,
    every_days: real,
    disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    updated_by: userRef(true),
    ...ts,
  });
  await q.addIndex('service_tasks', ['engine_id', 'task_key'], { name: 'service_tasks_engine_task', unique: true });

  await q.createTable('run_hours_adjustments', {
    id,
    engine_id: engineRef,
    old_run_hours: { type: DataTypes.DOUBLE, allowNull: false },
    new_run_hours: { type: DataTypes.DOUBLE, allowNull: false },
    user_id: userRef(true),
    reason: { type: DataTypes.STRING(500), allowNull: false },
    at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('run_hours_adjustments', ['engine_id', 'at'], { name: 'run_hours_adjustments_engine' });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  for (const t of ['run_hours_adjustments', 'service_tasks', 'additive_profiles', 'coolant_tests']) await q.dropTable(t);
}
