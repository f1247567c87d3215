/**
 * Supplemental coolant additive (SCA): what to do after a test strip reading, and how much liquid to add after
 * a refill. The limits and the dose are common practice of the trade (defaults, overridable); the engine maker's
 * figures come first where they differ.
 */
import { LITRES_PER_US_GALLON, LITRES_PER_US_PINT } from '../units';
import { CoolantInputError, requireFinite, requireInRange, requireOneOf } from './validate';

export type CoolantFamily = 'conventional' | 'extended-life';
export const COOLANT_FAMILIES: readonly CoolantFamily[] = ['conventional', 'extended-life'];
export type AdditiveStatus = 'low' | 'in-range' | 'high' | 'not-applicable';
export type FilterChoice = 'charged' | 'blank';

export interface ScaLimits {
  /** Lowest acceptable level, units per US gallon. */
  low: number;
  /** Highest acceptable level, units per US gallon (3.0 by default; 3.3 is also met in practice). */
  high: number;
}

/** Common practice: 1.2 to 3.0 units per US gallon. */
export const DEFAULT_SCA_LIMITS: Readonly<ScaLimits> = Object.freeze({ low: 1.2, high: 3.0 });
/** Common practice: about one US pint of liquid additive per 4 US gallons of system capacity when low. */
export const LOW_DOSE_PINTS_PER_4_GALLONS = 1;
/** Largest cooling-system capacity accepted, litres (anything beyond is taken as a typing error). */
export const MAX_CAPACITY_L = 10000;
/** Liquid doses are rounded to this step, litres. */
export const DOSE_STEP_L = 0.05;
/**
 * Smallest practical dose, litres (5 mL, what a graduated syringe measures reliably; common practice). Doses
 * under one DOSE_STEP_L are given in steps of this size instead of rounding to 0.00 L.
 */
export const MIN_PRACTICAL_DOSE_L = 0.005;

export interface PracticalDose {
  /** The dose to measure, litres: a multiple of DOSE_STEP_L, or of MIN_PRACTICAL_DOSE_L below it. */
  litres: number;
  /** The dose as computed, before rounding. */
  exactL: number;
  /** How it was rounded, in words (null when nothing is to be added). */
  note: string | null;
}

/**
 * Round a computed dose to something that can be measured: 0.05 L steps; below 0.05 L, 5 mL steps; never
 * 0 L for a dose that is needed (the minimum practical dose 5 mL instead, said so).
 */
export function practicalDose(exactL: number): PracticalDose {
  const exact = requireFinite('dose', exactL);
  if (exact <= 0) return { litres: 0, exactL: Math.max(0, exact), note: null };
  const ml = (l: number): string => `${Math.round(l * 1000)} mL`;
  if (exact < MIN_PRACTICAL_DOSE_L) {
    return {
      litres: MIN_PRACTICAL_DOSE_L,
      exactL: exact,
      note: `The exact dose, ${ml(exact)}, is below the smallest practical dose of ${ml(MIN_PRACTICAL_DOSE_L)}: add ${ml(MIN_PRACTICAL_DOSE_L)} and test again, or refill with coolant that already carries its additive.`,
    };
  }
  if (exact < DOSE_STEP_L) {
    const litres = Math.max(MIN_PRACTICAL_DOSE_L, Math.round(Math.round(exact / MIN_PRACTICAL_DOSE_L) * MIN_PRACTICAL_DOSE_L * 1000) / 1000);
    return {
      litres,
      exactL: exact,
      note: `Small dose: ${ml(exact)} exactly, rounded to ${ml(litres)} (5 mL steps under ${DOSE_STEP_L.toFixed(2)} L); measure it with a graduated syringe.`,
    };
  }
  const litres = Math.max(DOSE_STEP_L, roundToStep(exact, 'nearest'));
  return { litres, exactL: exact, note: `Rounded from ${exact.toFixed(3)} L to the nearest ${DOSE_STEP_L.toFixed(2)} L.` };
}

export const unitsPerGalToPerLitre = (unitsPerGal: number): number => unitsPerGal / LITRES_PER_US_GALLON;
export const unitsPerLitreToPerGal = (unitsPerLitre: number): number => unitsPerLitre * LITRES_PER_US_GALLON;

export interface AdditiveInput {
  coolantFamily: CoolantFamily;
  /** Test-strip reading, units per US gallon. May be null for extended-life coolant (strips do not apply). */
  scaUnitsPerGal: number | null;
  /** Cooling-system capacity, litres. */
  capacityL: number;
  limits?: Partial<ScaLimits>;
}

export interface AdditiveDecision {
  status: AdditiveStatus;
  /** Coolant filter to fit at this service; null when the decision does not apply. */
  filter: FilterChoice | null;
  /** Liquid additive to add now, litres (0 when none), rounded to 0.05 L. */
  liquidAdditiveL: number;
  /** The same dose in US pints, for people who measure that way. */
  liquidAdditiveUsPints: number;
  /** How the dose was rounded, in words (only when a dose is given). */
  doseNote?: string | null;
  /** The reading as given (per US gallon) and converted (per litre). */
  scaUnitsPerGal: number | null;
  scaUnitsPerLitre: number | null;
  limits: ScaLimits;
  reasons: string[];
  cautions: string[];
}

const ADDITIVE_CAUTIONS = [
  'Test and top up only with the engine stopped and the cooling system cool and without pressure.',
  'Additive concentrate is a chemical: wear gloves and eye protection and follow its safety data sheet.',
  "The engine maker's coolant instructions come first where they differ from these defaults.",
];

function resolveLimits(limits: Partial<ScaLimits> | undefined): ScaLimits {
  const low = limits?.low === undefined ? DEFAULT_SCA_LIMITS.low : requireInRange('limits.low', limits.low, 0, 100, 'units/gal');
  const high = limits?.high === undefined ? DEFAULT_SCA_LIMITS.high : requireInRange('limits.high', limits.high, 0, 100, 'units/gal');
  if (!(high > low)) throw new CoolantInputError('limits.high', `must be above limits.low (${low} units/gal; got ${high})`);
  return { low, high };
}

function requireCapacity(capacityL: unknown): number {
  const c = requireFinite('capacityL', capacityL);
  if (c <= 0 || c > MAX_CAPACITY_L) throw new CoolantInputError('capacityL', `must be above 0 and at most ${MAX_CAPACITY_L} L (got ${c} L)`);
  return c;
}

const roundToStep = (litres: number, mode: 'nearest' | 'up' | 'down'): number => {
  const n = litres / DOSE_STEP_L;
  // Guard against binary noise such as 1.0000000002 steps turning into an extra step.
  const k = mode === 'nearest' ? Math.round(n) : mode === 'up' ? Math.ceil(n - 1e-9) : Math.floor(n + 1e-9);
  return Math.round(k * DOSE_STEP_L * 100) / 100;
};

const fmt = (x: number, digits = 2): string => x.toFixed(digits);

/** The SCA decision after a test-strip reading. */
export function decideAdditive(input: AdditiveInput): AdditiveDecision {
  const family = requireOneOf('coolantFamily', input?.coolantFamily, COOLANT_FAMILIES);
  const capacityL = requireCapacity(input.capacityL);
  const limits = resolveLimits(input.limits);
  const cautions = [...ADDITIVE_CAUTIONS];

  if (family === 'extended-life') {
    const reading = input.scaUnitsPerGal;
    if (reading !== null && reading !== undefined) requireInRange('scaUnitsPerGal', reading, 0, 100, 'units/gal');
    return {
      status: 'not-applicable',
      filter: null,
      liquidAdditiveL: 0,
      liquidAdditiveUsPints: 0,
      scaUnitsPerGal: reading ?? null,
      scaUnitsPerLitre: reading === null || reading === undefined ? null : unitsPerGalToPerLitre(reading),
      limits,
      reasons: [
        'Extended-life coolant: SCA test strips do not measure its inhibitors, so the reading is not valid.',
        "Follow the coolant maker's instructions, or send a sample for laboratory analysis.",
      ],
      cautions: [...cautions, 'Do not add conventional SCA to extended-life coolant unless its maker says so.'],
    };
  }

  const units = requireInRange('scaUnitsPerGal', input.scaUnitsPerGal, 0, 100, 'units/gal');
  const perL = unitsPerGalToPerLitre(units);
  const reading = `${fmt(units)} units/US gal (${fmt(perL, 3)} units/L)`;
  const range = `${fmt(limits.low)} to ${fmt(limits.high)} units/US gal`;

  if (units < limits.low) {
    const gallons = capacityL / LITRES_PER_US_GALLON;
    const pints = (gallons / 4) * LOW_DOSE_PINTS_PER_4_GALLONS;
    const dose = practicalDose(pints * LITRES_PER_US_PINT);
    const litres = dose.litres;
    const shownL = litres < DOSE_STEP_L ? fmt(litres, 3) : fmt(litres);
    return {
      status: 'low',
      filter: 'charged',
      liquidAdditiveL: litres,
      liquidAdditiveUsPints:
        litres < DOSE_STEP_L ? Math.round((litres / LITRES_PER_US_PINT) * 1000) / 1000 : Math.round((litres / LITRES_PER_US_PINT) * 10) / 10,
      doseNote: dose.note,
      scaUnitsPerGal: units,
      scaUnitsPerLitre: perL,
      limits,
      reasons: [
        `Additive low: ${reading} is below ${fmt(limits.low)} units/US gal.`,
        'Change the coolant filter for a charged one.',
        `Add about one US pint of liquid additive per 4 US gallons of capacity: ${shownL} L for ${fmt(capacityL, 1)} L (${fmt(gallons, 1)} US gal).`,
        ...(dose.note ? [dose.note] : []),
        'Test again after the engine has run and the coolant has mixed.',
      ],
      cautions,
    };
  }
  if (units <= limits.high) {
    return {
      status: 'in-range',
      filter: 'charged',
      liquidAdditiveL: 0,
      liquidAdditiveUsPints: 0,
      scaUnitsPerGal: units,
      scaUnitsPerLitre: perL,
      limits,
      reasons: [`Additive in range: ${reading} is within ${range}.`, 'Keep changing the charged coolant filter at each oil-drain interval.'],
      cautions,
    };
  }
  return {
    status: 'high',
    filter: 'blank',
    liquidAdditiveL: 0,
    liquidAdditiveUsPints: 0,
    scaUnitsPerGal: units,
    scaUnitsPerLitre: perL,
    limits,
    reasons: [
      `Additive high: ${reading} is above ${fmt(limits.high)} units/US gal.`,
      'Fit a blank coolant filter and add no additive.',
      `Test again at the next service; go back to charged filters once the level is below ${fmt(limits.high)} units/US gal.`,
    ],
    cautions: [...cautions, 'Too much additive can drop out as deposits and harm water-pump seals.'],
  };
}

export interface InitialChargeInput {
  /** Cooling-system capacity, litres. */
  capacityL: number;
  /** Level to reach, units per US gallon (default 1.2). */
  targetUnitsPerGal?: number;
  /** Additive units the new charged filter releases into the system (0 for a blank filter). */
  filterPrechargeUnits: number;
  /** Strength of the liquid additive, units per litre of liquid (from its label). */
  liquidUnitsPerLitre: number;
  /** Level never to exceed, units per US gallon (default 3.0). */
  upperUnitsPerGal?: number;
}

export interface InitialCharge {
  /** Litres of liquid additive to add, rounded to 0.05 L. */
  liquidL: number;
  /** Level expected with the filter and that dose, units per US gallon and per litre. */
  expectedUnitsPerGal: number;
  expectedUnitsPerLitre: number;
  reasons: string[];
  cautions: string[];
}

/**
 * Liquid additive to add after a drain and refill with fresh water-glycol, so that filter and liquid together
 * bring the level to the target; never a dose that would take it above the upper limit.
 */
export function initialChargeAfterRefill(input: InitialChargeInput): InitialCharge {
  const capacityL = requireCapacity(input?.capacityL);
  const target =
    input.targetUnitsPerGal === undefined ? DEFAULT_SCA_LIMITS.low : requireInRange('targetUnitsPerGal', input.targetUnitsPerGal, 0, 100, 'units/gal');
  const upper =
    input.upperUnitsPerGal === undefined ? DEFAULT_SCA_LIMITS.high : requireInRange('upperUnitsPerGal', input.upperUnitsPerGal, 0, 100, 'units/gal');
  if (!(upper >= target)) throw new CoolantInputError('targetUnitsPerGal', `must not be above upperUnitsPerGal (${upper}; got ${target})`);
  const filterUnits = requireInRange('filterPrechargeUnits', input.filterPrechargeUnits, 0, 1e6, 'units');
  const strength = requireFinite('liquidUnitsPerLitre', input.liquidUnitsPerLitre);
  if (strength <= 0 || strength > 1e5) throw new CoolantInputError('liquidUnitsPerLitre', `must be above 0 and at most 100000 units/L (got ${strength})`);

  const gallons = capacityL / LITRES_PER_US_GALLON;
  const level = (litres: number): number => (filterUnits + litres * strength) / gallons;
  const reasons: string[] = [];
  const cautions = [...ADDITIVE_CAUTIONS];

  let liquidL = 0;
  const neededUnits = target * gallons - filterUnits;
  if (neededUnits <= 0) {
    reasons.push(`The filter alone brings ${fmt(level(0))} units/US gal, at or above the target ${fmt(target)}: no liquid needed.`);
  } else {
    liquidL = roundToStep(neededUnits / strength, 'up');
    if (level(liquidL) > upper) liquidL = roundToStep(neededUnits / strength, 'down');
    reasons.push(
      `Target ${fmt(target)} units/US gal in ${fmt(capacityL, 1)} L (${fmt(gallons, 1)} US gal): ${fmt(neededUnits, 1)} units beyond the filter's ${fmt(filterUnits, 1)}.`,
      `Add ${fmt(liquidL)} L of liquid additive at ${fmt(strength, 1)} units/L.`,
    );
  }
  const expected = level(liquidL);
  if (expected > upper) {
    cautions.push(`The filter alone would take the level to ${fmt(expected)} units/US gal, above ${fmt(upper)}: fit a blank filter instead.`);
  } else if (expected < target) {
    reasons.push(`Rounding to ${DOSE_STEP_L} L steps leaves the level at ${fmt(expected)} units/US gal; test after the engine has run.`);
  }
  reasons.push('Test the level after the engine has run and the coolant has mixed.');
  return { liquidL, expectedUnitsPerGal: expected, expectedUnitsPerLitre: unitsPerGalToPerLitre(expected), reasons, cautions };
}
