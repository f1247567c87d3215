import type { Sequelize } from 'sequelize';
import type { AccessEvents } from './auth/access-events';
import type { Cluster } from './cluster';
import type { TokenService } from './auth/tokens';
import type { Config } from './config';
import type { Logger } from './logger';
import type { Models } from './models';
import type { ReadingHistory } from './services/work-orders/reading-history';
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
  telemetry:
    (Pick<Telemetry, 'liveState' | 'counters'> & Partial<Pick<Telemetry, 'brokerState' | 'relayCounters' | 'requestRebirth' | 'sparkplugHostState'>>) | null;
  /** Device accounts in the external broker (MQTT_DEVICE_ACCOUNTS=dynsec); absent otherwise. */
  deviceAccounts?: DeviceAccounts | null;
  startedAt: number;
  /** Recent readings of engines under work for the opening check, fed by telemetry (see openingHistoryOf). */
  openingHistory?: ReadingHistory;
  /** Ends sessions and device connections at once on revoke, rotate, disable, role/site/password change. */
  access?: AccessEvents;
  /** Several servers on PostgreSQL (server/cluster): engine leases and live push between servers; absent with one. */
  cluster?: Cluster | null;
}
