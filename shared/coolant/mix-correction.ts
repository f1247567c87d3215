/**
 * Correcting the glycol share of a full cooling system by draining some coolant and refilling with pure glycol,
 * water or a premix. Mass balance on glycol, shares by volume, volume contraction on mixing neglected:
 *   V c1 = (V - x) c0 + x cr   =>   x = V (c1 - c0) / (cr - c0)
 * (the mixing form of C1V1 = C2V2). With cr = 100 % glycol: x = V (c1 - c0) / (1 - c0); with water: x = V (c0 - c1) / c0.
 */
import { CoolantInputError, requireInRange } from './validate';
import { MAX_CAPACITY_L, practicalDose } from './additive';
import { OVER_CONCENTRATION_PERCENT } from './glycol';
import { LITRES_PER_US_GALLON } from '../units';

export type RefillLiquid = 'glycol' | 'water' | 'premix';

export interface MixCorrectionInput {
  /** Cooling-system capacity, litres (the system is full before and after). */
  capacityL: number;
  /** Measured glycol share, % by volume. */
  measuredPercent: number;
  /** Wanted glycol share, % by volume. */
  targetPercent: number;
  /** Refill with a premix of this share (% by volume) instead of pure glycol or water. */
  premixPercent?: number;
  /** Additive level measured before the correction, units per US gallon (conventional coolant), if known. */
  scaUnitsPerGal?: number;
  /** Strength of the liquid additive, units per litre (from its label), to turn the loss into a dose. */
  liquidUnitsPerLitre?: number;
}

/** What draining and refilling does to the additive (the refill liquid is taken to carry none). */
export interface AdditiveDilution {
  /** Share of the system replaced, and so of the additive removed, 0..1. */
  fractionReplaced: number;
  levelBeforeUnitsPerGal: number | null;
  levelAfterUnitsPerGal: number | null;
  /** Additive units to add back to reach the level before; null without a reading. */
  restoreUnits: number | null;
  /** Liquid additive to add back, litres (practical rounding); null without a reading and a strength. */
  restoreLiquidL: number | null;
  doseNote: string | null;
}

export interface MixCorrection {
  /** Coolant to drain, litres, and the same volume of refill liquid to add. */
  drainL: number;
  addL: number;
  /** null when nothing is to be done. */
  refill: RefillLiquid | null;
  /** Glycol share of the refill liquid, % by volume. */
  refillPercent: number | null;
  /** Glycol share after the correction, % by volume (equal to the target up to rounding). */
  resultingPercent: number;
  /** True when the whole system is drained and refilled with a premix at the target share. */
  fullDrain: boolean;
  additive: AdditiveDilution | null;
  reasons: string[];
}

/** How much to drain and what to refill with to move from the measured to the target glycol share. */
export function correctMix(input: MixCorrectionInput): MixCorrection {
  const V = requireInRange('capacityL', input?.capacityL, 0, MAX_CAPACITY_L, 'L');
  if (V <= 0) throw new CoolantInputError('capacityL', `must be above 0 L (got ${V} L)`);
  const c0 = requireInRange('measuredPercent', input.measuredPercent, 0, 100, '%') / 100;
  const c1 = requireInRange('targetPercent', input.targetPercent, 0, 100, '%') / 100;
  if (c1 * 100 > OVER_CONCENTRATION_PERCENT) {
    throw new CoolantInputError(
      'targetPercent',
      `above ${OVER_CONCENTRATION_PERCENT} % glycol more glycol protects less against freezing (and cools worse): choose a target of ${OVER_CONCENTRATION_PERCENT} % or less (got ${input.targetPercent} %)`,
    );
  }
  const sca = input.scaUnitsPerGal === undefined ? null : requireInRange('scaUnitsPerGal', input.scaUnitsPerGal, 0, 100, 'units/gal');
  const strength = input.liquidUnitsPerLitre === undefined ? null : requireInRange('liquidUnitsPerLitre', input.liquidUnitsPerLitre, 1e-6, 1e5, 'units/L');

  if (Math.abs(c1 - c0) < 1e-12) {
    return {
      drainL: 0,
      addL: 0,
      refill: null,
      refillPercent: null,
      resultingPercent: c0 * 100,
      fullDrain: false,
      additive: null,
      reasons: ['The mix is already at the target: nothing to drain.'],
    };
  }

  let refill: RefillLiquid;
  let cr: number;
  let fullDrain = false;
  if (input.premixPercent !== undefined) {
    refill = 'premix';
    cr = requireInRange('premixPercent', input.premixPercent, 0, 100, '%') / 100;
    const ok = c1 > c0 ? cr > c1 : cr < c1;
    // A premix at the target itself reaches it only by replacing all the coolant.
    if (Math.abs(cr - c1) < 1e-12) fullDrain = true;
    else if (!ok) {
      const need = c1 > c0 ? 'stronger' : 'weaker';
      throw new CoolantInputError(
        'premixPercent',
        `a ${need} premix than the target ${input.targetPercent} % is needed to move from ${input.measuredPercent} % (got ${input.premixPercent} %)`,
      );
    }
  } else {
    refill = c1 > c0 ? 'glycol' : 'water';
    cr = refill === 'glycol' ? 1 : 0;
  }

  const x = fullDrain ? V : (V * (c1 - c0)) / (cr - c0);
  const resulting = ((V - x) * c0 + x * cr) / V;
  const what = refill === 'premix' ? `${(cr * 100).toFixed(0)} % premix` : refill === 'glycol' ? 'pure glycol' : 'clean water';
  const additive = additiveDilution(V, x, sca, strength);
  const first = fullDrain
    ? `The premix equals the target: drain the system completely (${V.toFixed(1)} L) and refill with ${V.toFixed(1)} L of ${what}; a partial drain cannot reach ${(c1 * 100).toFixed(1)} %.`
    : `Drain ${x.toFixed(1)} L of the ${(c0 * 100).toFixed(1)} % mix and refill with ${x.toFixed(1)} L of ${what} to reach ${(c1 * 100).toFixed(1)} % in ${V.toFixed(1)} L.`;
  return {
    drainL: x,
    addL: x,
    refill,
    refillPercent: cr * 100,
    resultingPercent: resulting * 100,
    fullDrain,
    additive,
    reasons: [first, ...additiveReasons(additive), 'Run the engine to mix, let it cool, and test the mix and the additive again.'],
  };
}

/**
 * Mass balance on the additive: the drained coolant takes its share with it, the refill (water, glycol, or a
 * premix taken as uncharged) brings none, so the level falls by the share replaced.
 */
export function additiveDilution(capacityL: number, replacedL: number, scaUnitsPerGal: number | null, liquidUnitsPerLitre: number | null): AdditiveDilution {
  const f = Math.min(1, Math.max(0, replacedL / capacityL));
  if (scaUnitsPerGal === null) {
    return { fractionReplaced: f, levelBeforeUnitsPerGal: null, levelAfterUnitsPerGal: null, restoreUnits: null, restoreLiquidL: null, doseNote: null };
  }
  const after = scaUnitsPerGal * (1 - f);
  const units = (scaUnitsPerGal - after) * (capacityL / LITRES_PER_US_GALLON);
  const dose = liquidUnitsPerLitre === null ? null : practicalDose(units / liquidUnitsPerLitre);
  return {
    fractionReplaced: f,
    levelBeforeUnitsPerGal: scaUnitsPerGal,
    levelAfterUnitsPerGal: after,
    restoreUnits: units,
    restoreLiquidL: dose ? dose.litres : null,
    doseNote: dose ? dose.note : null,
  };
}

function additiveReasons(a: AdditiveDilution): string[] {
  const pct = (a.fractionReplaced * 100).toFixed(0);
  const out = [
    `Replacing ${pct} % of the coolant removes ${pct} % of its additive (inhibitors): the refill carries none unless its label says it is pre-charged.`,
  ];
  if (a.levelBeforeUnitsPerGal === null) {
    out.push('Test the additive after the correction and dose it back to its range.');
    return out;
  }
  out.push(
    `The additive falls from ${a.levelBeforeUnitsPerGal.toFixed(2)} to about ${a.levelAfterUnitsPerGal!.toFixed(2)} units/US gal; restoring it takes ${a.restoreUnits!.toFixed(1)} units.`,
  );
  if (a.restoreLiquidL !== null)
    out.push(
      `Add ${a.restoreLiquidL < 0.05 ? a.restoreLiquidL.toFixed(3) : a.restoreLiquidL.toFixed(2)} L of liquid additive to restore the level.${a.doseNote ? ' ' + a.doseNote : ''}`,
    );
  else out.push('Give the liquid additive strength (units per litre, from its label) for the dose in litres.');
  return out;
}
