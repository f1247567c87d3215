/** JSON shapes of the coolant-test API (server/services/coolant/coolant-tests.ts), shared by server and client. Types only. */
import type { AdditiveDecision, BreakdownSign, ChemistryFinding, FreezeAssessment } from '../coolant';
import type { TopUpEstimate, TopUpLiquid } from '../coolant/top-up';

export type TestMethod = 'strip' | 'refractometer' | 'lab';
export type CoolantTestSource = 'manual' | 'lab-import';

/** What was decided when the test was recorded; stored with the test so the record shows what was done and why. */
export interface CoolantDecision {
  /** Null when the test has no additive reading of conventional coolant. */
  additive: AdditiveDecision | null;
  /** Freeze protection from the measured glycol share (by volume, the engine's glycol type), when measured. */
  freeze: FreezeAssessment | null;
  /** One finding per measured chemistry field and the freeze protection against the site's design low (absent in older records). */
  findings?: ChemistryFinding[];
  notes: string[];
  engine: { capacityL: number; coolantFamily: string; glycolType: string; designLowC?: number | null };
}

/** The readings of one coolant test as entered: what POST /api/engines/:id/coolant-tests takes (with an optional `testedAt`), and part of every test the API answers. */
export interface CoolantTestReadings {
  method: TestMethod;
  scaUnitsPerGal: number | null;
  glycolPercent: number | null;
  freezePointC: number | null;
  ph: number | null;
  conductivityUsCm: number | null;
  /** Inhibitor readings (always sent by the server; optional for older shapes). */
  nitritePpm?: number | null;
  molybdatePpm?: number | null;
  reserveAlkalinityMl?: number | null;
  /** Signs of glycol breakdown looked for: null = not looked at, [] = none seen. */
  breakdownSigns?: BreakdownSign[] | null;
  appearance: string | null;
  notes: string | null;
}

/** One coolant test as the API answers it (times as ISO strings). */
export interface CoolantTestView extends CoolantTestReadings {
  id: number;
  engineId: number;
  testedAt: string;
  testedBy: number | null;
  testedByName: string | null;
  decision: CoolantDecision | null;
  source: CoolantTestSource;
  createdAt: string;
}

/** One coolant top-up as the API answers it (GET/POST /api/engines/:id/coolant-top-ups). */
export interface TopUpView {
  id: number;
  engineId: number;
  addedAt: string;
  volumeL: number;
  liquid: TopUpLiquid;
  premixPercent: number | null;
  notes: string | null;
  addedBy: number | null;
  /** The work order whose top-up step recorded it, if any. */
  workOrderId?: number | null;
}

export interface TopUpsAnswer {
  topUps: TopUpView[];
  /** Estimate from the last test with a glycol or additive reading and the top-ups after it; null without such a test. */
  estimate: (TopUpEstimate & { basedOnTestAt: string; topUpsSince: number }) | null;
}

/**
 * An engine's freeze protection from its latest coolant test with a glycol or freeze-point reading, judged now against
 * its site's design low temperature less the admin's margin (GET /api/engines `freezeProtection`; absent without such a test).
 */
export interface EngineFreezeStatus {
  /** short: warmer than needed; ok: meets it; high: over-concentrated glycol; unknown: no design low set or beyond the table. */
  status: 'ok' | 'short' | 'high' | 'unknown';
  /** Freeze point used (measured, else from the glycol share by the published table), °C. */
  freezePointC: number | null;
  /** Design low less the margin, °C; null without a design low. */
  requiredC: number | null;
  designLowC: number | null;
  marginK: number;
  testId: number;
  testedAt: string;
  message: string;
  action: string;
}
