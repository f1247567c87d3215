/** JSON shapes of an engine's service history (server/services/engine-history.ts), shared by server and client. Types only. */

export interface HistoryPart {
  kind: string;
  description: string | null;
  /** Fluids in L, filters and other parts in pcs. */
  quantity: number;
  unit: 'L' | 'pcs';
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

/** The engine the history is of. */
export interface HistoryEngine {
  id: number;
  name: string;
  siteId: number;
  siteName: string | null;
  duty: string;
  capacityL: number;
  coolantFamily: string;
  glycolType: string;
  glycolPercent: number;
  runHours: number;
  retiredAt: string | null;
}
