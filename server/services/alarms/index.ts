/**
 * The alarm feature in one place: mail catcher and outbox, rule engine fed by telemetry,
 * alarm lifecycle, notification and escalation. Its HTTP routers are in server/routes (alarmRouters),
 * wired by startServer, which creates the feature before the app and starts it once telemetry runs.
 */
import type { AppContext } from '../../app-context';
import { startMailCatcher, type MailCatcher } from '../../mail/mail-catcher';
import { startOutbox, type Outbox } from '../../mail/outbox';
import type { Telemetry } from '../../telemetry/types';
import { ALARMS_ROOM, alarmsSiteRoom } from '../../realtime/live-push';
import { loadAlarmSettings, type AlarmSettings } from './alarm-settings';
import { AlarmService, type AlarmView } from './alarm-service';
import { EngineDirectory } from './engine-directory';
import { Notifier } from './notifier';
import { RuleEngine } from './rule-engine';
import { storedReadings } from './stored-readings';

export interface AlarmFeature {
  settings: AlarmSettings;
  alarms: AlarmService;
  rules: RuleEngine;
  /** Null until started. */
  outbox(): Outbox | null;
  mailCatcher(): MailCatcher | null;
  start(telemetry: Pick<Telemetry, 'onReadings' | 'onLost' | 'emit' | 'liveState'>): Promise<void>;
  stop(): Promise<void>;
}

export function createAlarmFeature(ctx: AppContext, settings: AlarmSettings = loadAlarmSettings()): AlarmFeature {
  const { models, sequelize, log, config } = ctx;
  let outbox: Outbox | null = null;
  let catcher: MailCatcher | null = null;
  let emit: ((room: string, event: string, payload: unknown) => void) | null = null;
  let lastSeen: (engineId: number) => number | null = () => null;
  let timer: NodeJS.Timeout | null = null;
  let ticking = false;
  /** A tick whose slices are still running (a busy loop): the next tick waits for the next interval. */
  let slicing: Promise<void> | null = null;

  const directory = new EngineDirectory(models);
  const notifier = new Notifier({
    models,
    publicUrl: config.publicUrl,
    log,
    enqueue: (mail) => {
      if (!outbox) throw new Error('outbox not started');
      return outbox.enqueue(mail);
    },
  });
  // the rule engine and the alarm service need each other: the service asks for rule texts (from `rules`, made below)
  const alarms: AlarmService = new AlarmService({
    models,
    sequelize,
    log,
    settings,
    directory,
    notifier,
    ruleDef: (engineId, key) => rules.ruleDef(engineId, key),
    publish: (view: AlarmView) => {
      // one room for alarm events: browsers get them without the fleet's readings, and once each
      if (emit) emit(ALARMS_ROOM, 'alarm', view);
      // users limited to some sites watch their sites' alarm rooms instead (never both)
      if (emit && view.siteId !== null) emit(alarmsSiteRoom(view.siteId), 'alarm', view);
    },
  });
  const cluster = ctx.cluster ?? null;
  const rules: RuleEngine = new RuleEngine({
    models,
    log,
    directory,
    alarms,
    lastSeen: (id) => lastSeen(id),
    lateAfterMs: settings.lateAfterMs,
    ...(cluster ? { owns: (id: number) => cluster.owns(id), storedReadings: (ids: number[], since: number) => storedReadings(sequelize, ids, since) } : {}),
  });
  if (cluster) {
    alarms.setOwnership((id) => cluster.owns(id));
    cluster.onGained(() => rules.adopt().catch((err) => log.error('alarms: taking engines over failed', err)));
    cluster.onLost(() => rules.release());
  }

  return {
    settings,
    alarms,
    rules,
    outbox: () => outbox,
    mailCatcher: () => catcher,
    async start(telemetry) {
      if (!config.smtpHost) catcher = await startMailCatcher({ port: config.smtpPort, model: models.CaughtMail, log });
      // when the catcher took a random port (SMTP_PORT=0), send to the one it got
      const smtpPort = catcher ? catcher.port() : config.smtpPort;
      outbox = startOutbox({
        config: { ...config, smtpPort },
        model: models.OutboxMessage,
        log,
        retryBaseMs: settings.mailRetryBaseMs,
        retryMaxMs: settings.mailRetryMaxMs,
        timeoutMs: settings.mailTimeoutMs,
        parallel: settings.mailParallel,
      });
      emit = (room, event, payload) => telemetry.emit(room, event, payload);
      lastSeen = (id) => telemetry.liveState.lastSeen(id);
      await rules.load();
      await alarms.loadOpen();
      await rules.refreshEngines(true);
      telemetry.onReadings((batch) => rules.handleReadings(batch));
      telemetry.onLost?.((engineId, at) => rules.engineLost(engineId, at));
      timer = setInterval(() => {
        slicing ??= rules
          .tickInSlices()
          .catch((err) => log.error('alarms: tick failed', err))
          .finally(() => {
            slicing = null;
          });
        if (ticking) return; // a slow database: skip a housekeeping round rather than pile them up
        ticking = true;
        alarms
          .housekeeping()
          // alarms from late data whose engine never caught up: e-mailed once lateAfterMs after they arrived, if still active
          .then(() => alarms.caughtUp(null))
          .catch((err) => log.error('alarms: housekeeping failed', err))
          .finally(() => {
            ticking = false;
          });
      }, settings.tickMs);
      timer.unref();
      log.info(
        `alarms: ${rules.profileRules().length} rules, escalation after ${settings.escalateAfterMs / 1000} s, e-mail from ${settings.notifyMinPriority} priority`,
      );
    },
    async stop() {
      if (timer) clearInterval(timer);
      timer = null;
      await slicing;
      await alarms.idle();
      await outbox?.stop();
      await catcher?.stop();
    },
  };
}
