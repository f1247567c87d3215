/**
 * Estimating the additive and glycol left after top-ups, by mass balance. Each top-up of v litres into a
 * full system of V litres is taken to replace v litres of coolant that was lost (leaks, drips, samples take
 * their additive with them), so for the share f = v / V:
 *   level_after = level_before x (1 - f)          (the added liquid carries no additive)
 *   glycol_after = glycol_before x (1 - f) + glycol_added x f
 * Water boiled off alone leaves the additive behind; then the estimate errs low (on the safe side).
 */
import { CoolantInputError, requireFinite, requireInRange, requireOneOf } from './validate';

export type TopUpLiquid = 'water' | 'premix' | 'glycol';
export const TOP_UP_LIQUID_TYPES: readonly TopUpLiquid[] = ['water', 'premix', 'glycol'];

export interface TopUp {
  volumeL: number;
  liquid: TopUpLiquid;
  /** Glycol share of a premix, % by volume. */
  premixPercent?: number | null;
}

export interface TopUpEstimateInput {
  capacityL: number;
  /** Additive level at the last test, units per US gallon; null when not measured (or extended-life coolant). */
  scaUnitsPerGal: number | null;
  /** Glycol share at the last test, % by volume; null when not measured. */
  glycolPercent: number | null;
  /** Top-ups since that test, oldest first. */
  topUps: TopUp[];
  /** The additive low limit, units per US gallon. */
  lowUnitsPerGal: number;
  /** Nitrite at the last test, ppm (a strip or lab reading); null or absent when not measured. */
  nitritePpm?: number | null;
  /** The nitrite low limit, ppm (admin setting); needed with nitritePpm. */
  nitriteLowPpm?: number;
}

export interface TopUpEstimate {
  /** Share of the system replaced by all top-ups together (1 - product of (1 - f)). */
  replacedFraction: number;
  addedL: number;
  scaUnitsPerGal: number | null;
  glycolPercent: number | null;
  /** Nitrite estimated the same way (the added liquid carries none), ppm; null when not measured. */
  nitritePpm: number | null;
  /** True when the estimated additive level (or nitrite) is below its low limit: test now. */
  belowLow: boolean;
  reasons: string[];
}

const glycolOf = (t: TopUp): number => (t.liquid === 'water' ? 0 : t.liquid === 'glycol' ? 100 : requireInRange('premixPercent', t.premixPercent, 0, 100, '%'));

/** Estimate of the additive and glycol after the top-ups since the last test. */
export function estimateAfterTopUps(input: TopUpEstimateInput): TopUpEstimate {
  const V = requireFinite('capacityL', input.capacityL);
  if (V <= 0) throw new CoolantInputError('capacityL', `must be above 0 L (got ${V} L)`);
  let sca = input.scaUnitsPerGal === null ? null : requireInRange('scaUnitsPerGal', input.scaUnitsPerGal, 0, 100, 'units/gal');
  let glycol = input.glycolPercent === null ? null : requireInRange('glycolPercent', input.glycolPercent, 0, 100, '%');
  let nitrite = input.nitritePpm === null || input.nitritePpm === undefined ? null : requireInRange('nitritePpm', input.nitritePpm, 0, 100000, 'ppm');
  const nitriteLow = nitrite === null ? null : requireInRange('nitriteLowPpm', input.nitriteLowPpm, 0, 100000, 'ppm');
  let kept = 1;
  let added = 0;
  for (const t of input.topUps) {
    requireOneOf('liquid', t.liquid, TOP_UP_LIQUID_TYPES);
    const v = requireInRange('volumeL', t.volumeL, 0, V, 'L');
    const f = v / V;
    kept *= 1 - f;
    added += v;
    if (sca !== null) sca *= 1 - f;
    if (nitrite !== null) nitrite *= 1 - f;
    if (glycol !== null) glycol = glycol * (1 - f) + glycolOf(t) * f;
  }
  const replaced = 1 - kept;
  const scaLow = sca !== null && sca < input.lowUnitsPerGal;
  const nitriteBelow = nitrite !== null && nitriteLow !== null && nitrite < nitriteLow;
  const belowLow = scaLow || nitriteBelow;
  const reasons: string[] = [];
  if (!input.topUps.length) reasons.push('No top-ups since the last test.');
  else
    reasons.push(
      `${input.topUps.length} top-up(s), ${added.toFixed(1)} L in all, replaced about ${(replaced * 100).toFixed(0)} % of the ${V.toFixed(1)} L system.`,
    );
  if (sca !== null) {
    reasons.push(
      `Additive estimated at ${sca.toFixed(2)} units/US gal (the added liquid carries none; assumes the lost coolant leaked out with its additive).`,
    );
    if (scaLow) reasons.push(`That is below ${input.lowUnitsPerGal.toFixed(2)} units/US gal: test the coolant now.`);
  }
  if (nitrite !== null) {
    reasons.push(`Nitrite estimated at ${nitrite.toFixed(0)} ppm.`);
    if (nitriteBelow) reasons.push(`That is below ${nitriteLow} ppm: test the coolant now.`);
  }
  if (sca === null && nitrite === null) {
    reasons.push('No additive reading at the last test: the top-ups dilute the inhibitors by the same share; test to know the level.');
  }
  if (glycol !== null) reasons.push(`Glycol estimated at ${glycol.toFixed(1)} % by volume.`);
  return { replacedFraction: replaced, addedL: added, scaUnitsPerGal: sca, glycolPercent: glycol, nitritePpm: nitrite, belowLow, reasons };
}
