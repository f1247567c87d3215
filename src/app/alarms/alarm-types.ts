import { AlarmState } from '../../../shared/alarms/alarm-state';
import type { PerformanceReport } from '../../../shared/alarms/performance';
import type { AlarmHistoryView, AlarmPriority, AlarmView } from '../../../shared/api/alarms-view';

export type { AlarmPriority } from '../../../shared/api/alarms-view';

/** GET /api/alarms item and the `alarm` live event. */
export type Alarm = AlarmView;

export type AlarmHistoryEntry = AlarmHistoryView;

/** GET /api/alarms/:id */
export interface AlarmDetail extends Alarm {
  meaning: string | null;
  firstStep: string | null;
  history: AlarmHistoryEntry[];
  /** Entries in all (the history comes in pages of 200, in time order). */
  historyTotal?: number;
}

/** GET /api/alarms/summary */
export interface AlarmSummary {
  open: number;
  active: number;
  byState: Partial<Record<AlarmState, number>>;
  byPriority: Partial<Record<AlarmPriority, number>>;
  flood: { flooding: boolean; since: string | null; inLast10Min: number };
}

/** GET /api/alarms/performance. */
export type AlarmPerformance = PerformanceReport;

export type AlarmListView = 'active' | 'shelved' | 'all';
