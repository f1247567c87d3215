import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Express } from 'express';
import { Op, type Sequelize } from 'sequelize';
import type { AppContext } from './app-context';
import { createApp, type AppOptions } from './app';
import { restrictDataFiles, sqliteFileOf } from './data-files';
import { AccessEvents } from './auth/access-events';
import { sessionStillValid } from './auth/middleware';
import { loadJwtSecret } from './auth/jwt-secret';
import { createTokenService } from './auth/tokens';
import type { Config } from './config';
import { clusterWanted, createCluster } from './cluster';
import { underMigrationLock } from './cluster/migration-lock';
import { migrate } from './db/migrate';
import { startReadingPartitionUpkeep } from './db/reading-partitions';
import { createSequelize } from './db/sequelize';
import { createLogger, type Logger } from './logger';
import { initModels, type Models } from './models';
import { alarmRouters } from './routes';
import { createAlarmFeature, type AlarmFeature } from './services/alarms';
import { startRunHoursCounting } from './services/coolant';
import { siteOfEngineLookup } from './services/engines';
import { startRetention, type Retention } from './services/retention';
import { startCompactor } from './services/history/compactor';
import { openingHistoryOf } from './services/work-orders/reading-history';
import { siteScopeForUser } from './services/site-access';
import { createDynsecAccounts } from './telemetry/broker-accounts';
import { startTelemetry } from './telemetry';
import type { Telemetry } from './telemetry/types';

export interface ServerHandle {
  app: Express;
  httpServer: http.Server;
  sequelize: Sequelize;
  models: Models;
  telemetry: Telemetry;
  alarms: AlarmFeature;
  /** Removes raw readings past RAW_RETENTION_DAYS in small batches. */
  retention: Retention;
  ctx: AppContext;
  /** The port actually bound (config.port may be 0). */
  port: number;
  /** Flush telemetry, close HTTP, close the database. Safe to call twice. */
  stop(): Promise<void>;
}

export interface StartOptions extends AppOptions {
  log?: Logger;
  /** Interface to listen on; config.host (HOST, loopback by default) unless told otherwise. */
  host?: string;
}

export async function startServer(config: Config, opts: StartOptions = {}): Promise<ServerHandle> {
  const log = opts.log ?? createLogger(config.logLevel);
  fs.mkdirSync(config.dataDir, { recursive: true });
  restrictDataFiles(config.dataDir, sqliteFileOf(config.databaseUrl));
  const sequelize = createSequelize(config, log);
  const partitions = await underMigrationLock(config.databaseUrl, async () => {
    const applied = await migrate(sequelize, log);
    if (applied.length) log.info(`migrations applied: ${applied.join(', ')}`);
    const upkeep = startReadingPartitionUpkeep(sequelize, log, config.readingsRetentionDays);
    await upkeep.ready;
    return upkeep;
  });
  const models = initModels(sequelize);
  const tokens = createTokenService(config.jwtSecret ?? loadJwtSecret(config.dataDir));
  const access = new AccessEvents();
  const cluster = clusterWanted(config) ? createCluster(config, log) : null;
  const ctx: AppContext = { config, log, sequelize, models, tokens, telemetry: null, startedAt: Date.now(), access, cluster };
  if (config.mqttUrl && config.mqttDeviceAccounts === 'dynsec') {
    ctx.deviceAccounts = createDynsecAccounts({
      url: config.mqttUrl,
      clientId: `${config.mqttClientId}-accounts`,
      log,
      revokedUsernames: async () => (await models.Device.findAll({ where: { revokedAt: { [Op.ne]: null } }, attributes: ['username'] })).map((d) => d.username),
    });
  }
  const openingHistory = openingHistoryOf(ctx);
  const alarms = createAlarmFeature(ctx);
  const app = createApp(ctx, { ...opts, extraRouters: (doc) => [...(opts.extraRouters?.(doc) ?? []), ...alarmRouters(ctx, alarms, doc)] });
  const httpServer = http.createServer(app);

  const telemetry = await startTelemetry({
    config,
    sequelize,
    httpServer,
    verifyToken: (t) => tokens.verify(t),
    siteOfEngine: siteOfEngineLookup(models),
    siteScope: (user) => siteScopeForUser(models, user),
    sessionValid: (user) => sessionStillValid(models, user),
    access,
    log,
    adapter: cluster?.adapter,
    hostRole: cluster?.hostRole,
    sparkplugHostReady: ctx.deviceAccounts ? () => ctx.deviceAccounts!.hostRights(config.sparkplugHostId) : undefined,
  });
  ctx.telemetry = telemetry;
  telemetry.onReadings(openingHistory.onReadings);
  await alarms.start(telemetry);
  const stopRunHours = startRunHoursCounting(ctx, telemetry);
  // several servers: this one evaluates the engines whose leases it holds (all of them while it is alone)
  await cluster?.startLeases();
  const retention = startRetention({ sequelize, log, config });
  const compactor = startCompactor({ sequelize, log, config });

  await new Promise<void>((resolve, reject) => {
    httpServer.once('error', reject);
    httpServer.listen(config.port, opts.host ?? config.host, () => {
      httpServer.off('error', reject);
      resolve();
    });
  });
  const port = (httpServer.address() as AddressInfo).port;
  log.info(`HTTP listening on ${opts.host ?? config.host}:${port}`);

  let stopping: Promise<void> | null = null;
  const stop = () =>
    (stopping ??= (async () => {
      await retention.stop();
      await compactor.stop();
      partitions.stop();
      await telemetry.stop();
      await ctx.deviceAccounts?.close();
      await cluster?.close();
      await alarms.stop();
      await stopRunHours();
      await new Promise<void>((resolve) => {
        httpServer.close(() => resolve());
        httpServer.closeAllConnections();
      });
      await sequelize.close();
    })());

  return { app, httpServer, sequelize, models, telemetry, alarms, retention, ctx, port, stop };
}
