import type { CoolantTestReadings, CoolantTestView } from '../../../shared/api/coolant-view';
import type { ChemistryLimits } from '../../../shared/coolant';
import type { TopUpLiquid } from '../../../shared/coolant/top-up';

export type { CoolantDecision, CoolantTestSource, TestMethod } from '../../../shared/api/coolant-view';

/** One coolant test as the coolant-test API answers it. */
export type CoolantTest = CoolantTestView;

/** A new coolant test: its readings (shared/api/coolant-view.ts), at a time given or now. */
export type NewCoolantTest = CoolantTestReadings & { testedAt?: string };

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
