/** Shapes of the work-order API (server/routes/work-orders.ts). Quantities in SI as stored. */
import type { CoolantDecision, CoolantTestView } from '../../../shared/api/coolant-view';
import type { WorkOrderSummary, WorkStatus } from '../../../shared/api/work-view';
export type { WorkOrderSummary, WorkPriority, WorkStatus } from '../../../shared/api/work-view';
export type StepInput = 'value' | 'photo' | 'confirmation';

export interface WorkCaution {
  id: string;
  title: string;
  text: string;
}

export interface TemplateStep {
  key: string;
  title: string;
  input: StepInput;
  unit?: string;
  gated: boolean;
  optional?: boolean;
  detail?: string;
  caution?: string;
}

export interface WorkTemplate {
  kind: string;
  title: string;
  steps: TemplateStep[];
  cautions: WorkCaution[];
}

export interface OpeningCondition {
  name: string;
  met: boolean;
  value: number | boolean | null;
  limit: number | boolean | null;
  unit: string;
  detail?: string;
}

export interface ManualCheck {
  gaugeKpa: number;
  tempC: number;
  minutesSinceStop: number;
  checkedBy: string;
  reason: string;
}

export interface WorkStep {
  id: number;
  position: number;
  key: string;
  title: string;
  detail: string | null;
  input: StepInput;
  unit: string | null;
  optional: boolean;
  gated: boolean;
  caution: string | null;
  /** Keys of earlier steps that must be done first (shared/work/step-order.ts). */
  after: string[];
  resultValue: number | null;
  resultUnit: string | null;
  resultText: string | null;
  lockoutConfirmed: boolean | null;
  gateSnapshot: { at: string; clear: boolean; stale: boolean; manual: boolean; conditions: OpeningCondition[] } | null;
  manualCheck: ManualCheck | null;
  doneAt: string | null;
  doneByName: string | null;
}

export interface WorkPart {
  id: number;
  kind: string;
  description: string | null;
  quantity: number;
  unit: 'L' | 'pcs';
  addedByName: string | null;
  createdAt: string;
}

export interface WorkAttachment {
  id: number;
  stepId: number | null;
  originalName: string;
  contentType: string;
  size: number;
  uploadedByName: string | null;
  createdAt: string;
  url: string;
}

export interface WorkEvent {
  id: number;
  at: string;
  userName: string | null;
  event: string;
  fromStatus: WorkStatus | null;
  toStatus: WorkStatus | null;
  note: string | null;
  details: Record<string, unknown> | null;
}

export interface WorkAmendment {
  id: number;
  text: string;
  authorName: string | null;
  createdAt: string;
}

/** The coolant test a work order recorded (once per order). */
/** The coolant test a work order recorded, as the coolant-test API answers it (shared/api/coolant-view.ts). */
export type OrderCoolantTest = CoolantTestView;

export interface WorkOrderDetail extends WorkOrderSummary {
  coolantTestId: number | null;
  coolantTest: OrderCoolantTest | null;
  cautions: WorkCaution[];
  steps: WorkStep[];
  parts: WorkPart[];
  attachments: WorkAttachment[];
  history: WorkEvent[];
  amendments: WorkAmendment[];
}

export interface OpeningCheck {
  engineId: number;
  at: string;
  clear: boolean;
  conditions: OpeningCondition[];
  clearAt: number | null;
  /** The forecast's band (earliest-latest); wider than a point when the ambient had to be fitted. */
  forecast?: { at: number; earliest: number; latest: number | null; ambientFitted: boolean } | null;
  reasons: string[];
  stale: boolean;
  settings: {
    safeOpenTempC: number;
    maxPressureKpa: number;
    minStoppedS: number;
    holdS: number;
    staleAfterS: number;
    heaterSetpointC?: number | null;
    ambientC?: number | null;
  };
}

/** The 409 body of a gated step refused by the server. */
export interface GateRefusal {
  error: string;
  conditions: OpeningCondition[];
  clearAt: number | null;
  reasons: string[];
  stale: boolean;
}

export interface Assignee {
  id: number;
  name: string;
  email: string;
}

/** What the work screens need of a coolant test (GET /api/engines/:id/coolant-tests, newest first). */
/** What the filter-change default reads of an engine's coolant tests (GET /api/engines/:id/coolant-tests): the additive decision's filter. */
export type CoolantTestSummary = Pick<CoolantTestView, 'id' | 'testedAt'> & {
  decision: { additive: Pick<NonNullable<CoolantDecision['additive']>, 'filter'> | null } | null;
};
