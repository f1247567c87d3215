import { DataTypes } from 'sequelize';
import type { MigrationContext } from '../migrate';

const ts = { created_at: { type: DataTypes.DATE, allowNull: false }, updated_at: { type: DataTypes.DATE, allowNull: false } };
const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };

export async function up({ queryInterface: q }: MigrationContext): Promise<void> {
  await q.createTable('users', {
    id,
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    password_hash: { type: DataTypes.STRING(100), allowNull: false },
    role: { type: DataTypes.STRING(16), allowNull: false },
    disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ...ts,
  });
  await q.createTable('sites', {
    id,
    name: { type: DataTypes.STRING(120), allowNull: false },
    time_zone: { type: DataTypes.STRING(64), allowNull: false },
    retired_at: { type: DataTypes.DATE, allowNull: true },
  });
  await q.createTable('engines', {
    id,
    site_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'sites', key: 'id' } },
    name: { type: DataTypes.STRING(120), allowNull: false },
    duty: { type: DataTypes.STRING(16), allowNull: false },
    capacity_l: { type: DataTypes.DOUBLE, allowNull: false },
    coolant_family: { type: DataTypes.STRING(16), allowNull: false },
    glycol_type: { type: DataTypes.STRING(16), allowNull: false },
    glycol_percent: { type: DataTypes.DOUBLE, allowNull: false },
    cap_pressure_kpa: { type: DataTypes.DOUBLE, allowNull: false },
    oil_drain_interval_h: { type: DataTypes.DOUBLE, allowNull: false },
    run_hours: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    safe_open_temp_c: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 50 },
    heater_setpoint_c: { type: DataTypes.DOUBLE, allowNull: true },
    out_of_service: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    retired_at: { type: DataTypes.DATE, allowNull: true },
    ...ts,
  });
  await q.addIndex('engines', ['site_id']);
  await q.createTable('devices', {
    id,
    engine_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'engines', key: 'id' } },
    username: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    secret_hash: { type: DataTypes.STRING(100), allowNull: false },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    last_seen_at: { type: DataTypes.DATE, allowNull: true },
    ...ts,
  });
  await q.addIndex('devices', ['engine_id']);
  await q.createTable('device_rejections', {
    device_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      primaryKey: true,
      references: { model: 'devices', key: 'id' },
      onDelete: 'CASCADE',
    },
    reason: { type: DataTypes.STRING(32), allowNull: false, primaryKey: true },
    count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    last_at: { type: DataTypes.DATE, allowNull: true },
    last_detail: { type: DataTypes.STRING(500), allowNull: true },
  });
  // hot path tables: plain integers, no foreign keys, written by raw SQL
  await q.createTable('readings', {
    engine_id: { type: DataTypes.INTEGER, allowNull: false },
    channel: { type: DataTypes.INTEGER, allowNull: false },
    ts: { type: DataTypes.BIGINT, allowNull: false },
    value: { type: DataTypes.DOUBLE, allowNull: false },
    quality: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
  });
  await q.addIndex('readings', ['engine_id', 'channel', 'ts'], { name: 'readings_engine_channel_ts' });
  await q.createTable('rollups', {
    engine_id: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    channel: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    minute: { type: DataTypes.BIGINT, allowNull: false, primaryKey: true },
    min: { type: DataTypes.DOUBLE, allowNull: true },
    max: { type: DataTypes.DOUBLE, allowNull: true },
    sum: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    bad_count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
  });
}

export async function down({ queryInterface: q }: MigrationContext): Promise<void> {
  for (const t of ['rollups', 'readings', 'device_rejections', 'devices', 'engines', 'sites', 'users']) await q.dropTable(t);
}
