import { isPriority, type AlarmPriority } from './priority';

/** Settings of the alarm feature, from the environment (defaults in brackets). */
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

function seconds(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isFinite(n) || n <= 0) throw new Error(`${name} must be a positive number of seconds, got "${raw}"`);
  return n;
}

function count(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 100) throw new Error(`${name} must be a whole number from 1 to 100, got "${raw}"`);
  return n;
}

export function loadAlarmSettings(env: NodeJS.ProcessEnv = process.env): AlarmSettings {
  const min = env.NOTIFY_MIN_PRIORITY || 'medium';
  if (!isPriority(min)) throw new Error(`NOTIFY_MIN_PRIORITY must be low, medium, high or urgent, got "${min}"`);
  return {
    escalateAfterMs: seconds(env, 'ESCALATE_AFTER_S', 15 * 60) * 1000,
    notifyMinPriority: min,
    tickMs: seconds(env, 'ALARM_TICK_MS', 1000),
    mailRetryBaseMs: seconds(env, 'MAIL_RETRY_BASE_S', 5) * 1000,
    mailRetryMaxMs: seconds(env, 'MAIL_RETRY_MAX_S', 600) * 1000,
    mailTimeoutMs: seconds(env, 'MAIL_TIMEOUT_S', 5) * 1000,
    mailParallel: count(env, 'MAIL_PARALLEL', 4),
    lateAfterMs: seconds(env, 'ALARM_LATE_AFTER_S', 120) * 1000,
    chatterCount: Math.max(2, Math.round(seconds(env, 'ALARM_CHATTER_COUNT', 3))),
    chatterWindowMs: seconds(env, 'ALARM_CHATTER_WINDOW_S', 60) * 1000,
  };
}
