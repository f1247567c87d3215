import type { CoolantTestView, TestMethod } from '../../../shared/api/coolant-view';
import type { BreakdownSign, ChemistryLimits } from '../../../shared/coolant';
import type { TopUpLiquid } from '../../../shared/coolant/top-up';

export type { CoolantDecision, CoolantTestSource, TestMethod } from '../../../shared/api/coolant-view';

/** One coolant test as the coolant-test API answers it. */
export type CoolantTest = CoolantTestView;

export interface NewCoolantTest {
  method: TestMethod;
  testedAt?: string;
  scaUnitsPerGal: number | null;
  glycolPercent: number | null;
  freezePointC: number | null;
  ph: number | null;
  conductivityUsCm: number | null;
  nitritePpm?: number | null;
  molybdatePpm?: number | null;
  reserveAlkalinityMl?: number | null;
  /** Glycol-breakdown signs looked for: null = not looked at, [] = none seen. */
  breakdownSigns?: BreakdownSign[] | null;
  appearance: string | null;
  notes: string | null;
}

export interface ImportResult {
  preview: boolean;
  accepted: { line: number; engineId: number; testedAt: string; status: string | null; summary: string }[];
  rejected: { line: number; field: string | null; error: string }[];
  stored: number;
}

export interface DueEntry {
  engineId: number;
  engineName: string;
  runHours: number;
  taskKey: string;
  title: string;
  state: 'overdue' | 'due-soon' | 'ok';
  reason: string;
  dueAt: string | null;
  dueAtRunHours: number | null;
  lastDoneAt: string | null;
  lastDoneRunHours: number | null;
  placeholder: boolean;
  basis: string;
  workKind: string | null;
  openWorkOrderId: number | null;
}

export interface DueSite {
  siteId: number;
  siteName: string;
  timeZone: string;
  overdue: number;
  dueSoon: number;
  entries: DueEntry[];
}

export interface DueListResponse {
  now: string;
  windowDays: number;
  windowHours: number;
  sites: DueSite[];
}

/** One page of the due list (offset paging): each site keeps its counts over all pages. */
export interface DueListPageResponse extends DueListResponse {
  sites: (DueSite & { entryTotal: number })[];
  total: number;
  limit: number;
  offset: number;
}

export interface AdditiveProfile {
  configured: boolean;
  name: string;
  liquidUnitsPerLitre: number | null;
  filterSizes: { label: string; prechargeUnits: number }[];
  limits: { low: number; high: number };
  updatedAt?: string | null;
}

export interface AdditiveProfileInput {
  name: string;
  liquidUnitsPerLitre: number;
  filterSizes: { label: string; prechargeUnits: number }[];
  scaLow: number;
  scaHigh: number;
}

/** One hand correction of an engine's run hours (audit). */
export interface RunHoursEntry {
  id: number;
  oldRunHours: number;
  newRunHours: number;
  userId: number | null;
  userName: string | null;
  reason: string;
  at: string;
}

export type { TopUpLiquid };
export type { TopUpView as CoolantTopUp, TopUpsAnswer } from '../../../shared/api/coolant-view';

export interface NewTopUp {
  volumeL: number;
  liquid: TopUpLiquid;
  premixPercent: number | null;
  notes: string | null;
}

export interface ChemistryLimitsView {
  limits: ChemistryLimits;
  defaults: ChemistryLimits;
  extender: { everyHours: number | null; everyDays: number | null } | null;
  extenderDefault: { everyHours: number | null; everyDays: number | null };
  configured: boolean;
  updatedAt: string | null;
}
