import { parseEnv } from '../../config';
import type { AlarmPriority } from './priority';

/** Settings of the alarm feature, from the environment (defaults in brackets; rules in server/config.ts envSchema). */
export interface AlarmSettings {
  /** ESCALATE_AFTER_S [900]: not acknowledged this long after an e-mail -> the next person is told. */
  escalateAfterMs: number;
  /** NOTIFY_MIN_PRIORITY [medium]: new alarms at or above this priority are e-mailed. */
  notifyMinPriority: AlarmPriority;
  /** ALARM_TICK_MS [1000]: clock for no-data, delays, shelf expiry and escalation. */
  tickMs: number;
  /** MAIL_RETRY_BASE_S [5] and MAIL_RETRY_MAX_S [600]: outbox back-off. */
  mailRetryBaseMs: number;
  mailRetryMaxMs: number;
  /** MAIL_TIMEOUT_S [5]: limit for connecting to the relay, its greeting and each of its answers, per message. */
  mailTimeoutMs: number;
  /** MAIL_PARALLEL [4]: messages on their way at once, so one hanging message does not hold the others. */
  mailParallel: number;
  /**
   * ALARM_LATE_AFTER_S [120]: an alarm raised from readings older than this when they arrive (backfill,
   * store-and-forward) is "from late data": e-mailed only if still active once the engine's data catches up.
   */
  lateAfterMs: number;
  /**
   * ALARM_CHATTER_COUNT [3] and ALARM_CHATTER_WINDOW_S [60]: an alarm that comes into alarm this many times
   * within the window is chattering (ISA-18.2's notion; the figures are a common working threshold).
   */
  chatterCount: number;
  chatterWindowMs: number;
}

/** The alarm settings of the one configuration schema (server/config.ts). */
export function loadAlarmSettings(env: NodeJS.ProcessEnv = process.env): AlarmSettings {
  const e = parseEnv(env);
  return {
    escalateAfterMs: e.ESCALATE_AFTER_S * 1000,
    notifyMinPriority: e.NOTIFY_MIN_PRIORITY,
    tickMs: e.ALARM_TICK_MS,
    mailRetryBaseMs: e.MAIL_RETRY_BASE_S * 1000,
    mailRetryMaxMs: e.MAIL_RETRY_MAX_S * 1000,
    mailTimeoutMs: e.MAIL_TIMEOUT_S * 1000,
    mailParallel: e.MAIL_PARALLEL,
    lateAfterMs: e.ALARM_LATE_AFTER_S * 1000,
    chatterCount: e.ALARM_CHATTER_COUNT,
    chatterWindowMs: e.ALARM_CHATTER_WINDOW_S * 1000,
  };
}
