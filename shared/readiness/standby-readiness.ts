/**
 * Is a standby engine ready to start and take load? "Ready" or "Not ready" with the reasons in words.
 * A standby set exists to start when the mains fail: anything that would keep it from doing so at once
 * counts (the jacket-water minimum follows NFPA 110's heater requirement, 32 °C / 90 °F by default; the
 * clause, 5.3.1 in recent editions, is quoted from memory). Pure: the caller gathers the facts.
 */
import { cToF } from '../units';

export interface ReadinessFacts {
  outOfService: boolean;
  /** Latest good jacket-water temperature (°C) and its time (ms), or null when none. */
  coolantTempC: number | null;
  coolantTs: number | null;
  /** Last time anything was heard from the engine (ms), or null. */
  lastSeenAt: number | null;
  running: boolean;
  /** Every latest value is bad: the source declared its data lost (a Sparkplug death certificate) or all sensors failed. */
  dataLost?: boolean;
  /** Minimum jacket-water temperature while stopped (°C). */
  minTempC: number;
  /** Active alarms of high or urgent priority (titles). */
  urgentAlarms: { title: string; priority: string }[];
  /** Open lockouts on work orders, when known (null: not known). */
  lockouts: { workOrderId: number; title: string }[] | null;
  /** Data older than this is stale (ms). */
  staleAfterMs: number;
  now: number;
}

export interface Readiness {
  ready: boolean;
  reasons: string[];
}

/** Default jacket-water minimum for a stopped standby engine (°C): 32 °C = 90 °F. */
export const STANDBY_MIN_TEMP_C = 32;

const one = (n: number) => n.toFixed(1);
const ago = (ms: number) =>
  ms < 90 * 60_000
    ? `${Math.max(1, Math.round(ms / 60_000))} min ago`
    : ms < 48 * 3600_000
      ? `${Math.round(ms / 3600_000)} h ago`
      : `${Math.round(ms / 86_400_000)} days ago`;

export function standbyReadiness(f: ReadinessFacts): Readiness {
  const reasons: string[] = [];
  if (f.outOfService) reasons.push('Out of service');
  if (f.lastSeenAt === null) reasons.push('No data from the engine: its state is not known');
  else if (f.now - f.lastSeenAt > f.staleAfterMs) reasons.push(`Data stale: last reading ${ago(f.now - f.lastSeenAt)}`);
  else if (f.dataLost) reasons.push('No good reading: the gateway reported its data lost or every sensor reads bad; the state is not known');
  const fresh = f.coolantTs !== null && f.now - f.coolantTs <= f.staleAfterMs;
  if (!f.running && fresh && f.coolantTempC !== null && f.coolantTempC < f.minTempC) {
    reasons.push(
      `Jacket water cold: ${one(f.coolantTempC)} °C (${one(cToF(f.coolantTempC))} °F), below the ${one(f.minTempC)} °C (${one(cToF(f.minTempC))} °F) needed to start and take load at once`,
    );
  }
  for (const a of f.urgentAlarms) reasons.push(`Active ${a.priority} alarm: ${a.title}`);
  for (const l of f.lockouts ?? []) reasons.push(`Lockout open on work order ${l.workOrderId} (${l.title})`);
  return { ready: reasons.length === 0, reasons };
}
