import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

/**
 * Coolant chemistry in depth: inhibitor readings on coolant tests (nitrite, molybdate, reserve alkalinity),
 * the site's lowest expected temperature, the admin's chemistry limits and extender interval (one row, JSON) and the record of
 * coolant top-ups. Portable queryInterface calls only.
 */
const real = () => ({ type: DataTypes.DOUBLE, allowNull: true });
const ts = () => ({ created_at: { type: DataTypes.DATE, allowNull: false }, updated_at: { type: DataTypes.DATE, allowNull: false } });

export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.addColumn('coolant_tests', 'nitrite_ppm', real());
  await q.addColumn('coolant_tests', 'molybdate_ppm', real());
  await q.addColumn('coolant_tests', 'reserve_alkalinity_ml', real());
  await q.addColumn('sites', 'design_low_temp_c', real());
  await q.createTable('coolant_settings', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    /** Partial ChemistryLimits (shared/coolant/chemistry.ts); missing keys take the defaults. */
    chemistry_limits: { type: DataTypes.JSON, allowNull: false },
    /** { everyHours, everyDays } of the extended-life coolant extender; null = the common-practice default. */
    extender_interval: { type: DataTypes.JSON, allowNull: true },
    updated_by: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' } },
    ...ts(),
  });
  await q.createTable('coolant_top_ups', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    engine_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'engines', key: 'id' }, onDelete: 'CASCADE' },
    added_at: { type: DataTypes.DATE, allowNull: false },
    volume_l: { type: DataTypes.DOUBLE, allowNull: false },
    /** water | premix | glycol */
    liquid: { type: DataTypes.STRING(16), allowNull: false },
    premix_percent: real(),
    notes: { type: DataTypes.STRING(500), allowNull: true },
    added_by: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' } },
    work_order_id: { type: DataTypes.INTEGER, allowNull: true },
    ...ts(),
  });
  await q.addIndex('coolant_top_ups', ['engine_id', 'added_at'], { name: 'coolant_top_ups_engine_time' });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.dropTable('coolant_top_ups');
  await q.dropTable('coolant_settings');
  await q.removeColumn('sites', 'design_low_temp_c');
  for (const c of ['reserve_alkalinity_ml', 'molybdate_ppm', 'nitrite_ppm']) await q.removeColumn('coolant_tests', c);
}
