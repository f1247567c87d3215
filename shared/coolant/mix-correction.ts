/**
 * Correcting the glycol share of a full cooling system by draining some coolant and refilling with pure glycol,
 * water or a premix. Mass balance on glycol, shares by volume, volume contraction on mixing neglected:
 *   V c1 = (V - x) c0 + x cr   =>   x = V (c1 - c0) / (cr - c0)
 * (the mixing form of C1V1 = C2V2). With cr = 100 % glycol: x = V (c1 - c0) / (1 - c0); with water: x = V (c0 - c1) / c0.
 */
import { CoolantInputError, requireInRange } from './validate';
import { MAX_CAPACITY_L } from './additive';

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
  reasons: string[];
}

/** How much to drain and what to refill with to move from the measured to the target glycol share. */
export function correctMix(input: MixCorrectionInput): MixCorrection {
  const V = requireInRange('capacityL', input?.capacityL, 0, MAX_CAPACITY_L, 'L');
  if (V <= 0) throw new CoolantInputError('capacityL', `must be above 0 L (got ${V} L)`);
  const c0 = requireInRange('measuredPercent', input.measuredPercent, 0, 100, '%') / 100;
  const c1 = requireInRange('targetPercent', input.targetPercent, 0, 100, '%') / 100;

  if (Math.abs(c1 - c0) < 1e-12) {
    return { drainL: 0, addL: 0, refill: null, refillPercent: null, resultingPercent: c0 * 100, reasons: ['The mix is already at the target: nothing to drain.'] };
  }

  let refill: RefillLiquid;
  let cr: number;
  if (input.premixPercent !== undefined) {
    refill = 'premix';
    cr = requireInRange('premixPercent', input.premixPercent, 0, 100, '%') / 100;
    const ok = c1 > c0 ? cr > c1 : cr < c1;
    if (!ok) {
      const need = c1 > c0 ? 'stronger' : 'weaker';
      throw new CoolantInputError('premixPercent', `a ${need} premix than the target ${input.targetPercent} % is needed to move from ${input.measuredPercent} % (got ${input.premixPercent} %)`);
    }
  } else {
    refill = c1 > c0 ? 'glycol' : 'water';
    cr = refill === 'glycol' ? 1 : 0;
  }

  const x = (V * (c1 - c0)) / (cr - c0);
  const resulting = ((V - x) * c0 + x * cr) / V;
  const what = refill === 'premix' ? `${(cr * 100).toFixed(0)} % premix` : refill === 'glycol' ? 'pure glycol' : 'clean water';
  return {
    drainL: x,
    addL: x,
    refill,
    refillPercent: cr * 100,
    resultingPercent: resulting * 100,
    reasons: [
      `Drain ${x.toFixed(1)} L of the ${(c0 * 100).toFixed(1)} % mix and refill with ${x.toFixed(1)} L of ${what} to reach ${(c1 * 100).toFixed(1)} % in ${V.toFixed(1)} L.`,
      'Run the engine to mix, let it cool, and test the mix again.',
    ],
  };
}
