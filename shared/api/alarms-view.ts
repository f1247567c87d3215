/** JSON shapes of the alarm API (server/services/alarms/alarm-service.ts), shared by server and client. Types only. */
import type { AlarmState } from '../alarms/alarm-state';

export type AlarmPriority = 'low' | 'medium' | 'high' | 'urgent';

/** GET /api/alarms item and the `alarm` live event (times as ISO strings, values in the stored unit `unit`). */
export interface AlarmView {
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
  /** First found chattering (came into alarm N times within the window; a candidate for a longer deadband or delay). */
  chatteringAt?: string | null;
}

/** A page of an alarm's history (GET /api/alarms/:id/history), in time order. */
export interface AlarmHistoryPage {
  total: number;
  limit: number;
  offset: number;
  entries: AlarmHistoryView[];
}

/** One entry of an alarm's history in GET /api/alarms/:id. */
export interface AlarmHistoryView {
  at: string;
  event: string;
  fromState: AlarmState | null;
  toState: AlarmState | null;
  userId: number | null;
  value: number | null;
  note: string | null;
}
