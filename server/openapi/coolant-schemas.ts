/** Response bodies of the coolant routes and the calculators, as the handlers answer them (types from shared/). */
import { z } from 'zod';
import type { CoolantTestView, TopUpsAnswer, TopUpView } from '../../shared/api/coolant-view';
import { BREAKDOWN_SIGNS } from '../../shared/coolant/chemistry';
import type { AdditiveDecision as AdditiveDecisionType, FreezeAssessment as FreezeAssessmentType, InitialCharge, MixCorrection } from '../../shared/coolant';
import type { MakeUpWaterResult } from '../../shared/coolant/make-up-water';
import type { AdditiveProfileView } from '../services/coolant/additive-profile';
import type { ChemistryLimitsView } from '../services/coolant/chemistry-limits';
import type { ImportResult } from '../services/coolant/coolant-tests';
import type { DueSiteView, PlanTask as PlanTaskType } from '../services/coolant/service-plan';
import { TEST_METHODS, TOP_UP_LIQUIDS } from '../models/coolant-models';
import { WORK_KINDS } from '../services/work-templates';
import { covers, pageCounts } from './api-doc';

const isoTime = z.string().openapi({ format: 'date-time' });
const n = z.number();
const nOrNull = z.number().nullable();
const strings = z.array(z.string());
const glycol = z.enum(['ethylene', 'propylene']);
const basis = z.enum(['volume', 'mass']);

export const ScaLimits = z.object({ low: n.openapi({ description: 'units/US gal' }), high: n.openapi({ description: 'units/US gal' }) });

export const AdditiveDecision = z
  .object({
    status: z.enum(['low', 'in-range', 'high', 'not-applicable']),
    filter: z.enum(['charged', 'blank']).nullable(),
    liquidAdditiveL: n,
    liquidAdditiveUsPints: n,
    doseNote: z.string().nullable().optional(),
    scaUnitsPerGal: nOrNull,
    scaUnitsPerLitre: nOrNull,
    limits: ScaLimits,
    reasons: strings,
    cautions: strings,
  })
  .openapi('AdditiveDecision');
covers<AdditiveDecisionType>()(AdditiveDecision);

export const FreezeAssessment = z
  .object({
    glycol,
    percent: n,
    basis,
    freezePointC: nOrNull,
    overConcentrated: z.boolean(),
    tableMaxPercent: n,
    warnings: strings,
    source: z.string(),
  })
  .openapi('FreezeAssessment');
covers<FreezeAssessmentType>()(FreezeAssessment);

const ChemistryFinding = z.object({
  field: z.enum(['nitritePpm', 'molybdatePpm', 'ph', 'reserveAlkalinityMl', 'freezeProtection', 'breakdownSigns']),
  status: z.enum(['ok', 'low', 'high', 'short', 'unknown', 'signs']),
  value: nOrNull,
  message: z.string(),
  action: z.string(),
  source: z.string(),
});

export const CoolantTest = z
  .object({
    id: z.number().int(),
    engineId: z.number().int(),
    testedAt: isoTime,
    method: z.enum(TEST_METHODS),
    scaUnitsPerGal: nOrNull.openapi({ description: 'units per US gallon' }),
    glycolPercent: nOrNull.openapi({ description: '% by volume' }),
    freezePointC: nOrNull,
    ph: nOrNull,
    conductivityUsCm: nOrNull.openapi({ description: 'µS/cm' }),
    nitritePpm: nOrNull.optional(),
    molybdatePpm: nOrNull.optional(),
    reserveAlkalinityMl: nOrNull.optional().openapi({ description: 'mL (ASTM D1121)' }),
    breakdownSigns: z.array(z.enum(BREAKDOWN_SIGNS)).nullable().optional().openapi({ description: 'null: not looked at; []: none seen' }),
    appearance: z.string().nullable(),
    notes: z.string().nullable(),
    testedBy: z.number().int().nullable(),
    testedByName: z.string().nullable(),
    decision: z
      .object({
        additive: AdditiveDecision.nullable(),
        freeze: FreezeAssessment.nullable(),
        findings: z.array(ChemistryFinding).optional(),
        notes: strings,
        engine: z.object({ capacityL: n, coolantFamily: z.string(), glycolType: z.string(), designLowC: nOrNull.optional() }),
      })
      .nullable(),
    source: z.enum(['manual', 'lab-import']),
    createdAt: isoTime,
  })
  .openapi('CoolantTest');
covers<CoolantTestView>()(CoolantTest);

export const TopUp = z
  .object({
    id: z.number().int(),
    engineId: z.number().int(),
    addedAt: isoTime,
    volumeL: n,
    liquid: z.enum(TOP_UP_LIQUIDS),
    premixPercent: nOrNull,
    notes: z.string().nullable(),
    addedBy: z.number().int().nullable(),
    workOrderId: z.number().int().nullable().optional(),
  })
  .openapi('TopUp');
covers<TopUpView>()(TopUp);

export const TopUps = z.object({
  topUps: z.array(TopUp),
  estimate: z
    .object({
      replacedFraction: n,
      addedL: n,
      scaUnitsPerGal: nOrNull,
      glycolPercent: nOrNull,
      nitritePpm: nOrNull,
      belowLow: z.boolean(),
      reasons: strings,
      basedOnTestAt: isoTime,
      topUpsSince: z.number().int(),
    })
    .nullable(),
});
covers<TopUpsAnswer>()(TopUps);

export const LabImport = z.object({
  preview: z.boolean(),
  accepted: z.array(z.object({ line: z.number().int(), engineId: z.number().int(), testedAt: isoTime, status: z.string().nullable(), summary: z.string() })),
  rejected: z.array(z.object({ line: z.number().int(), field: z.string().nullable(), error: z.string() })),
  stored: z.number().int(),
  format: z.object({ encoding: z.enum(['utf-8', 'windows-1252']), separator: z.enum([',', ';']), decimalComma: z.boolean() }),
  notices: strings,
});
covers<ImportResult>()(LabImport);

export const AdditiveProfile = z
  .object({
    configured: z.boolean(),
    name: z.string(),
    liquidUnitsPerLitre: nOrNull,
    filterSizes: z.array(z.object({ label: z.string(), prechargeUnits: n })),
    limits: ScaLimits,
    updatedAt: isoTime.nullable(),
  })
  .openapi('AdditiveProfile');
covers<AdditiveProfileView>()(AdditiveProfile);

const chemistryLimits = z.object({
  nitriteLowPpm: n,
  nitriteHighPpm: n,
  molybdateLowPpm: n,
  molybdateHighPpm: n,
  phLow: n,
  phHigh: n,
  reserveAlkalinityLowMl: n,
  freezeMarginK: n,
});
const extender = z.object({ everyHours: nOrNull, everyDays: nOrNull });
export const CoolantLimits = z
  .object({
    limits: chemistryLimits,
    defaults: chemistryLimits,
    extender: extender.nullable(),
    extenderDefault: extender,
    configured: z.boolean(),
    updatedAt: isoTime.nullable(),
  })
  .openapi('CoolantLimits');
covers<ChemistryLimitsView>()(CoolantLimits);

export const RunHoursAdjustment = z.object({
  id: z.number().int(),
  oldRunHours: n,
  newRunHours: n,
  userId: z.number().int().nullable(),
  userName: z.string().nullable(),
  reason: z.string(),
  at: isoTime,
});
export const RunHoursCorrected = z.object({
  engineId: z.number().int(),
  oldRunHours: n,
  runHours: n,
  reason: z.string(),
  at: isoTime,
  userId: z.number().int(),
});

export const PlanTask = z
  .object({
    key: z.string(),
    title: z.string(),
    everyHours: nOrNull.optional(),
    everyDays: nOrNull.optional(),
    placeholder: z.boolean().optional(),
    basis: z.string(),
    overridden: z.boolean(),
    workKind: z.enum(WORK_KINDS),
  })
  .openapi('PlanTask');
covers<PlanTaskType>()(PlanTask);

const dueSite = z.object({
  siteId: z.number().int(),
  siteName: z.string(),
  timeZone: z.string(),
  overdue: z.number().int(),
  dueSoon: z.number().int(),
  entries: z.array(
    z.object({
      engineId: z.number().int(),
      engineName: z.string(),
      runHours: n,
      taskKey: z.string(),
      title: z.string(),
      state: z.enum(['overdue', 'due-soon', 'ok']),
      reason: z.string(),
      dueAt: isoTime.nullable(),
      dueAtRunHours: nOrNull,
      lastDoneAt: isoTime.nullable(),
      lastDoneRunHours: nOrNull,
      everyHours: nOrNull,
      everyDays: nOrNull,
      placeholder: z.boolean(),
      basis: z.string(),
      workKind: z.enum(WORK_KINDS),
      openWorkOrderId: z.number().int().nullable(),
    }),
  ),
});
covers<DueSiteView>()(dueSite);
export const DueList = z.object({ now: isoTime, windowDays: n, windowHours: n, sites: z.array(dueSite) }).openapi('DueList');
/** With `offset`: one page of the rows across the sites, each site with its own row count. */
export const DueListPage = z
  .object({ now: isoTime, windowDays: n, windowHours: n, sites: z.array(dueSite.extend({ entryTotal: z.number().int() })), ...pageCounts })
  .openapi('DueListPage');

// ---- calculators (compute, never store)

const caution = z.object({ id: z.enum(['hot-pressure', 'glycol-toxic', 'protective-gear', 'disposal', 'defer']), title: z.string(), text: z.string() });
const coolantCautions = z.array(caution).openapi({ description: 'the usual cautions; the engine maker’s instructions come first' });

export const AdditiveAnswer = AdditiveDecision.extend({ coolantCautions });
export const FreezePointAnswer = FreezeAssessment.extend({ coolantCautions });
export const GlycolNeededAnswer = z.object({
  glycol,
  basis,
  freezePointC: n,
  percent: n,
  tableMaxPercent: n,
  warnings: strings,
  source: z.string(),
  coolantCautions,
});
export const BoilingPointAnswer = z.object({
  boilingPointC: n,
  gaugePressureKpa: n,
  absolutePressureKpa: n,
  atmosphereKpa: n,
  atmosphereSource: z.string(),
  elevationM: n.optional(),
  glycol,
  percent: n,
  basis,
  method: z.string(),
  warnings: strings,
  coolantCautions,
});
export const MixCorrectionAnswer = z.object({
  drainL: n,
  addL: n,
  refill: z.enum(['glycol', 'water', 'premix']).nullable(),
  refillPercent: nOrNull,
  resultingPercent: n,
  fullDrain: z.boolean(),
  additive: z
    .object({
      fractionReplaced: n,
      levelBeforeUnitsPerGal: nOrNull,
      levelAfterUnitsPerGal: nOrNull,
      restoreUnits: nOrNull,
      restoreLiquidL: nOrNull,
      doseNote: z.string().nullable(),
    })
    .nullable(),
  reasons: strings,
  coolantCautions,
});
export const MakeUpWaterAnswer = z.object({
  verdict: z.enum(['acceptable', 'not-acceptable', 'incomplete']),
  items: z.array(
    z.object({
      field: z.string(),
      label: z.string(),
      status: z.string(),
      value: nOrNull,
      unit: z.string(),
      limit: z.string(),
      estimated: z.boolean(),
    }),
  ),
  failures: strings,
  source: z.string(),
});
export const InitialChargeAnswer = z.object({
  liquidL: n,
  expectedUnitsPerGal: n,
  expectedUnitsPerLitre: n,
  reasons: strings,
  cautions: strings,
  liquidUnitsPerLitre: n,
  coolantCautions,
});
covers<MixCorrection>()(MixCorrectionAnswer.omit({ coolantCautions: true }));
covers<MakeUpWaterResult>()(MakeUpWaterAnswer);
covers<InitialCharge>()(InitialChargeAnswer.omit({ coolantCautions: true, liquidUnitsPerLitre: true }));
