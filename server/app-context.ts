import type { Sequelize } from 'sequelize';
import type { AccessEvents } from './auth/access-events';
import type { TokenService } from './auth/tokens';
import type { Config } from './config';
import type { Logger } from './logger';
import type { Models } from './models';
import type { DeviceAccounts } from './telemetry/broker-accounts';
import type { Telemetry } from './telemetry/types';

/** What routes and services need; one per running server (app.locals.ctx). */
export interface AppContext {
  config: Config;
  log: Logger;
  sequelize: Sequelize;
  models: Models;
  tokens: TokenService;
  /** Set once telemetry has started; before that every engine reads as having no data. */
  telemetry: (Pick<Telemetry, 'liveState' | 'counters'> & Partial<Pick<Telemetry, 'brokerState' | 'requestRebirth'>>) | null;
  /** Device accounts in the external broker (MQTT_DEVICE_ACCOUNTS=dynsec); absent otherwise. */
  deviceAccounts?: DeviceAccounts | null;
  startedAt: number;
  /** Ends sessions and device connections at once on revoke, rotate, disable, role/site/password change. */
  access?: AccessEvents;
}
