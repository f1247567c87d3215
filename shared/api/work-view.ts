/** JSON shapes of the work-order API (server/services/work-orders/views.ts), shared by server and client. Types only. */
export type WorkStatus = 'requested' | 'planned' | 'in-progress' | 'waiting-sign-off' | 'closed' | 'cancelled';
export type WorkPriority = 'low' | 'medium' | 'high' | 'urgent';

/** One work order in a list (times as ISO strings). */
export interface WorkOrderSummary {
  id: number;
  engineId: number;
  engineName: string | null;
  siteId: number | null;
  siteName: string | null;
  kind: string;
  kindTitle: string;
  title: string;
  description: string | null;
  priority: WorkPriority;
  dueDate: string | null;
  status: WorkStatus;
  assigneeId: number | null;
  assigneeName: string | null;
  createdBy: number;
  createdByName: string | null;
  requestedBy: number | null;
  requestedByName: string | null;
  signedOffBy: number | null;
  signedOffByName: string | null;
  alarmIds: number[];
  stepsDone: number;
  stepsTotal: number;
  /** A step went ahead on a manual check instead of live data: shown prominently. */
  manualChecks: number;
  createdAt: string;
  updatedAt: string;
  startedAt: string | null;
  completedAt: string | null;
  signedOffAt: string | null;
  closedAt: string | null;
}
