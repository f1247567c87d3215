import { AlarmState } from '../../../shared/alarms/alarm-state';

export type AlarmPriority = 'low' | 'medium' | 'high' | 'urgent';

/** GET /api/alarms item and the `alarm` live event (times as ISO strings, values in the stored unit `unit`). */
export interface Alarm {
  id: number;
  engineId: number;
  engineName: string | null;
  siteId: number | null;
  siteName: string | null;
  rule: string;
  title: string;
  priority: AlarmPriority;
  state: AlarmState;
  active: boolean;
  raisedAt: string;
  value: number | null;
  worstValue: number | null;
  /** degC, K (a temperature difference), degC/min, kPa, kPa/min, uS/cm, rpm, or null (no value, e.g. no data). */
  unit: string | null;
  message: string;
  acknowledgedAt: string | null;
  acknowledgedBy: number | null;
  note: string | null;
  shelvedUntil: string | null;
  shelveReason: string | null;
  clearedAt: string | null;
  closedAt: string | null;
  escalationLevel: number;
  lastNotifiedAt: string | null;
}

export interface AlarmHistoryEntry {
  at: string;
  event: string;
  fromState: AlarmState | null;
  toState: AlarmState | null;
  userId: number | null;
  value: number | null;
  note: string | null;
}

/** GET /api/alarms/:id */
export interface AlarmDetail extends Alarm {
  meaning: string | null;
  firstStep: string | null;
  history: AlarmHistoryEntry[];
}

/** GET /api/alarms/summary */
export interface AlarmSummary {
  open: number;
  active: number;
  byState: Partial<Record<AlarmState, number>>;
  byPriority: Partial<Record<AlarmPriority, number>>;
  flood: { flooding: boolean; since: string | null; inLast10Min: number };
}

/** GET /api/alarms/performance (shared/alarms/performance.ts PerformanceReport). */
export interface AlarmPerformance {
  from: number;
  to: number;
  total: number;
  days: number;
  perDay: number;
  per10Min: number;
  max10Min: number;
  share10MinOver10: number;
  mostFrequent: { key: string; count: number; share: number }[];
  chattering: { key: string; bursts: number; maxInWindow: number }[];
  standing: { key: string; activatedAt: number; activeMs: number }[];
  acknowledge: { count: number; meanMs: number | null; medianMs: number | null; unacknowledged: number };
}

export type AlarmListView = 'active' | 'shelved' | 'all';
