import { CoolantTest } from '../coolant/coolant-types';
import { WorkOrderSummary } from '../work/work-types';
import type { HistoryEngine, HistoryPart, HistoryServiceEvent } from '../../../shared/api/engine-history-view';

export type { HistoryEngine, HistoryPart, HistoryServiceEvent } from '../../../shared/api/engine-history-view';

/** GET /api/engines/:id/history (server/services/engine-history.ts). SI units. */
export interface HistoryManualCheck {
  stepId: number;
  stepTitle: string;
  gaugeKpa: number;
  tempC: number;
  minutesSinceStop: number;
  checkedBy: string;
  reason: string;
  doneAt: string | null;
  doneByName: string | null;
}

export interface HistoryWorkOrder extends WorkOrderSummary {
  at: string;
  doneByNames: string[];
  parts: HistoryPart[];
  manualCheckSteps: HistoryManualCheck[];
  resets: { event: string; at: string; note: string | null; details: Record<string, unknown> | null }[];
}

export interface HistoryRunHours {
  id: number;
  oldRunHours: number;
  newRunHours: number;
  userName: string | null;
  reason: string;
  at: string;
}

export interface EngineHistory {
  engine: HistoryEngine;
  generatedAt: string;
  workOrders: HistoryWorkOrder[];
  coolantTests: CoolantTest[];
  runHoursAdjustments: HistoryRunHours[];
  serviceEvents: HistoryServiceEvent[];
}
