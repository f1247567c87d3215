import { CoolantTest } from '../coolant/coolant-types';
import { WorkOrderSummary } from '../work/work-types';

/** GET /api/engines/:id/history (server/services/engine-history.ts). SI units. */
export interface HistoryPart {
  kind: string;
  description: string | null;
  quantity: number;
  unit: 'L' | 'pcs';
}

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

export interface HistoryServiceEvent {
  id: number;
  taskKey: string;
  taskTitle: string;
  doneAt: string;
  runHours: number | null;
  workOrderId: number | null;
  workOrderTitle: string | null;
}

export interface EngineHistory {
  engine: {
    id: number; name: string; siteId: number; siteName: string | null; duty: string; capacityL: number;
    coolantFamily: string; glycolType: string; glycolPercent: number; runHours: number; retiredAt: string | null;
  };
  generatedAt: string;
  workOrders: HistoryWorkOrder[];
  coolantTests: CoolantTest[];
  runHoursAdjustments: HistoryRunHours[];
  serviceEvents: HistoryServiceEvent[];
}
