import type { Sequelize } from 'sequelize';
import { initAlarmModels, type AlarmModels } from './alarm-models';
import { initCoolantModels, type CoolantModels } from './coolant-models';
import { Device, initDevice } from './device';
import { DeviceRejection, initDeviceRejection } from './device-rejection';
import { Engine, initEngine } from './engine';
import { IdempotencyKey, initIdempotencyKey } from './idempotency-key';
import { Site, initSite } from './site';
import { User, initUser } from './user';
import { UserSite, initUserSite } from './user-site';
import { initWorkModels, type WorkModels } from './work-models';

export interface Models extends AlarmModels, WorkModels, CoolantModels {
  User: typeof User;
  UserSite: typeof UserSite;
  Site: typeof Site;
  Engine: typeof Engine;
  Device: typeof Device;
  DeviceRejection: typeof DeviceRejection;
  IdempotencyKey: typeof IdempotencyKey;
}

/** Initialise every model on this Sequelize instance and wire the associations. */
export function initModels(sequelize: Sequelize): Models {
  const models: Models = {
    User: initUser(sequelize),
    UserSite: initUserSite(sequelize),
    Site: initSite(sequelize),
    Engine: initEngine(sequelize),
    Device: initDevice(sequelize),
    DeviceRejection: initDeviceRejection(sequelize),
    IdempotencyKey: initIdempotencyKey(sequelize),
    ...initAlarmModels(sequelize),
    ...initWorkModels(sequelize),
    ...initCoolantModels(sequelize),
  };
  models.Site.hasMany(models.Engine, { foreignKey: 'siteId', as: 'engines' });
  models.Engine.belongsTo(models.Site, { foreignKey: 'siteId', as: 'site' });
  models.Engine.hasMany(models.Device, { foreignKey: 'engineId', as: 'devices' });
  models.Device.belongsTo(models.Engine, { foreignKey: 'engineId', as: 'engine' });
  models.Device.hasMany(models.DeviceRejection, { foreignKey: 'deviceId', as: 'rejections' });
  models.DeviceRejection.belongsTo(models.Device, { foreignKey: 'deviceId', as: 'device' });
  return models;
}

export { Device, DeviceRejection, Engine, IdempotencyKey, Site, User, UserSite };
