/**
 * Judging the inhibitor chemistry and the freeze protection of a coolant test, one finding per measured field,
 * each with its action in words.
 *
 * Default limits (admin setting; the coolant or engine maker's figures come first):
 * - pH 7.5 to 11.0: ASTM D3306 / D6210 requirement for the 50 vol % dilution of new coolant (recalled from
 *   memory, M); used in service as the range outside which the coolant is no longer protecting.
 * - nitrite 800 to 3200 ppm, molybdate 300 to 1500 ppm: in-service figures of the trade for conventional
 *   heavy-duty coolant kept up with supplemental additive (TMC recommended-practice style; common practice,
 *   from memory, M).
 * - reserve alkalinity at least 5.0 mL (ASTM D1121 titration of a 10 mL sample): common practice, from memory (M);
 *   half the new coolant's own figure is the better trigger where the lab gives it.
 * - freeze margin 5 K between the site's design low temperature and the coolant's freeze point: common practice.
 */
import { assessFreezeProtection, OVER_CONCENTRATION_PERCENT, percentForFreezePoint, type GlycolType } from './glycol';
import { CoolantInputError, requireFinite, requireInRange } from './validate';

export interface ChemistryLimits {
  nitriteLowPpm: number;
  nitriteHighPpm: number;
  molybdateLowPpm: number;
  molybdateHighPpm: number;
  phLow: number;
  phHigh: number;
  reserveAlkalinityLowMl: number;
  /** Kelvin between the design low temperature and the freeze point that must remain. */
  freezeMarginK: number;
}

export const DEFAULT_CHEMISTRY_LIMITS: Readonly<ChemistryLimits> = Object.freeze({
  nitriteLowPpm: 800,
  nitriteHighPpm: 3200,
  molybdateLowPpm: 300,
  molybdateHighPpm: 1500,
  phLow: 7.5,
  phHigh: 11.0,
  reserveAlkalinityLowMl: 5.0,
  freezeMarginK: 5,
});

/** Where each default comes from, shown beside the findings. */
export const CHEMISTRY_LIMIT_SOURCES = Object.freeze({
  ph: 'ASTM D3306 / D6210 pH of the 50 vol % dilution (from memory)',
  nitrite: 'common practice for conventional heavy-duty coolant with additive (from memory)',
  molybdate: 'common practice for conventional heavy-duty coolant with additive (from memory)',
  reserveAlkalinity: 'common practice, ASTM D1121 method (from memory)',
  breakdown: 'signs of glycol breakdown, common practice (from memory)',
  freeze: 'site design low temperature with a safety margin (common practice)',
});

export type FindingField = 'nitritePpm' | 'molybdatePpm' | 'ph' | 'reserveAlkalinityMl' | 'freezeProtection' | 'breakdownSigns';
/** `signs`: signs of glycol breakdown were seen. */
export type FindingStatus = 'ok' | 'low' | 'high' | 'short' | 'unknown' | 'signs';

/**
 * What a technician sees or smells in a sample when glycol has broken down (oxidised to organic acids such as
 * glycolic, formic and acetic acid by overheating or air drawn in): common practice of the trade, from memory.
 */
export const BREAKDOWN_SIGNS = ['sour-smell', 'dark-colour', 'sludge'] as const;
export type BreakdownSign = (typeof BREAKDOWN_SIGNS)[number];
export const BREAKDOWN_SIGN_TEXT: Readonly<Record<BreakdownSign, string>> = Object.freeze({
  'sour-smell': 'sour or burnt smell',
  'dark-colour': 'dark brown or black colour',
  sludge: 'sludge or sediment',
});

export interface ChemistryFinding {
  field: FindingField;
  status: FindingStatus;
  /** The measured value (for freeze protection: the freeze point used, °C). */
  value: number | null;
  /** What was found, in words. */
  message: string;
  /** What to do, in words. */
  action: string;
  source: string;
}

export interface ChemistryReading {
  nitritePpm?: number | null;
  molybdatePpm?: number | null;
  ph?: number | null;
  reserveAlkalinityMl?: number | null;
  glycolPercent?: number | null;
  freezePointC?: number | null;
  /** Signs of glycol breakdown the technician looked for: null/absent = not looked at; [] = looked, none seen. */
  breakdownSigns?: readonly BreakdownSign[] | null;
}

export interface ChemistryContext {
  glycolType: GlycolType;
  /** Extended-life coolant: the nitrite and molybdate limits (for conventional coolant) are not applied. */
  coolantFamily?: 'conventional' | 'extended-life';
  /** The site's lowest expected temperature, °C; null when not set. */
  designLowC: number | null;
}

/** Validate a limits object (each field named on error). */
export function resolveChemistryLimits(partial?: Partial<ChemistryLimits> | null): ChemistryLimits {
  const l = { ...DEFAULT_CHEMISTRY_LIMITS, ...(partial ?? {}) };
  requireInRange('nitriteLowPpm', l.nitriteLowPpm, 0, 100000, 'ppm');
  requireInRange('nitriteHighPpm', l.nitriteHighPpm, 0, 100000, 'ppm');
  requireInRange('molybdateLowPpm', l.molybdateLowPpm, 0, 100000, 'ppm');
  requireInRange('molybdateHighPpm', l.molybdateHighPpm, 0, 100000, 'ppm');
  requireInRange('phLow', l.phLow, 0, 14);
  requireInRange('phHigh', l.phHigh, 0, 14);
  requireInRange('reserveAlkalinityLowMl', l.reserveAlkalinityLowMl, 0, 100, 'mL');
  requireInRange('freezeMarginK', l.freezeMarginK, 0, 30, 'K');
  if (!(l.nitriteHighPpm > l.nitriteLowPpm)) throw new CoolantInputError('nitriteHighPpm', `must be above nitriteLowPpm (${l.nitriteLowPpm})`);
  if (!(l.molybdateHighPpm > l.molybdateLowPpm)) throw new CoolantInputError('molybdateHighPpm', `must be above molybdateLowPpm (${l.molybdateLowPpm})`);
  if (!(l.phHigh > l.phLow)) throw new CoolantInputError('phHigh', `must be above phLow (${l.phLow})`);
  return l;
}

const present = (v: number | null | undefined): v is number => v !== null && v !== undefined;
/** "-30.0 °C (-22.0 °F)": the words are read in either unit system (°F = °C x 1.8 + 32, NIST SP 811). */
const both = (c: number): string => `${c.toFixed(1)} °C (${(c * 1.8 + 32).toFixed(1)} °F)`;

function nitrite(v: number, l: ChemistryLimits): ChemistryFinding {
  const base = { field: 'nitritePpm' as const, value: v, source: CHEMISTRY_LIMIT_SOURCES.nitrite };
  const range = `${l.nitriteLowPpm} to ${l.nitriteHighPpm} ppm`;
  if (v < l.nitriteLowPpm) {
    return {
      ...base,
      status: 'low',
      message: `Nitrite low: ${v} ppm is below ${l.nitriteLowPpm} ppm. Too little inhibitor lets vapour bubbles collapse on the wet cylinder liners and pit them (cavitation).`,
      action: 'Add supplemental coolant additive (see the dose) or fit a charged coolant filter, run the engine to mix, and test again.',
    };
  }
  if (v > l.nitriteHighPpm) {
    return {
      ...base,
      status: 'high',
      message: `Nitrite high: ${v} ppm is above ${l.nitriteHighPpm} ppm. Too much additive drops out as deposits and gel that block passages and wear water-pump seals.`,
      action: 'Add no additive and fit a blank coolant filter; if far above, drain part of the coolant and refill with premix; test again.',
    };
  }
  return { ...base, status: 'ok', message: `Nitrite ${v} ppm is within ${range}.`, action: 'No action.' };
}

function molybdate(v: number, l: ChemistryLimits): ChemistryFinding {
  const base = { field: 'molybdatePpm' as const, value: v, source: CHEMISTRY_LIMIT_SOURCES.molybdate };
  if (v < l.molybdateLowPpm) {
    return {
      ...base,
      status: 'low',
      message: `Molybdate low: ${v} ppm is below ${l.molybdateLowPpm} ppm (where the coolant uses molybdate, it backs up nitrite against liner pitting).`,
      action: 'Dose supplemental coolant additive as for low nitrite and test again; ignore if your coolant carries no molybdate.',
    };
  }
  if (v > l.molybdateHighPpm) {
    return {
      ...base,
      status: 'high',
      message: `Molybdate high: ${v} ppm is above ${l.molybdateHighPpm} ppm: the additive is overdosed.`,
      action: 'Add no additive and fit a blank coolant filter until the level is back in range.',
    };
  }
  return { ...base, status: 'ok', message: `Molybdate ${v} ppm is within ${l.molybdateLowPpm} to ${l.molybdateHighPpm} ppm.`, action: 'No action.' };
}

function ph(v: number, l: ChemistryLimits): ChemistryFinding {
  const base = { field: 'ph' as const, value: v, source: CHEMISTRY_LIMIT_SOURCES.ph };
  if (v < l.phLow) {
    return {
      ...base,
      status: 'low',
      message: `pH low: ${v} is below ${l.phLow}. Acid coolant attacks iron, copper and solder; the usual causes are glycol breakdown from overheating or air, or exhaust gas leaking into the coolant.`,
      action: 'Drain, flush and refill with new coolant, and find the cause (overheating, air leak, head gasket or cooler leak).',
    };
  }
  if (v > l.phHigh) {
    return {
      ...base,
      status: 'high',
      message: `pH high: ${v} is above ${l.phHigh}. Strongly alkaline coolant attacks aluminium and seals; an overdose of additive or the wrong product are the usual causes.`,
      action: 'Check what was added; drain part of the coolant and refill with premix, then test again.',
    };
  }
  return { ...base, status: 'ok', message: `pH ${v} is within ${l.phLow} to ${l.phHigh}.`, action: 'No action.' };
}

function reserveAlkalinity(v: number, l: ChemistryLimits): ChemistryFinding {
  const base = { field: 'reserveAlkalinityMl' as const, value: v, source: CHEMISTRY_LIMIT_SOURCES.reserveAlkalinity };
  if (v < l.reserveAlkalinityLowMl) {
    return {
      ...base,
      status: 'low',
      message: `Reserve alkalinity low: ${v} mL is below ${l.reserveAlkalinityLowMl} mL: the buffer that neutralises acids is used up.`,
      action: 'Plan a drain, flush and refill with new coolant; additive alone does not restore the buffer of old coolant.',
    };
  }
  return { ...base, status: 'ok', message: `Reserve alkalinity ${v} mL is at or above ${l.reserveAlkalinityLowMl} mL.`, action: 'No action.' };
}

function freezeProtection(r: ChemistryReading, ctx: ChemistryContext, l: ChemistryLimits): ChemistryFinding | null {
  const haveGlycol = present(r.glycolPercent);
  if (!present(r.freezePointC) && !haveGlycol) return null;
  const base = { field: 'freezeProtection' as const, source: CHEMISTRY_LIMIT_SOURCES.freeze };
  let fp: number | null = present(r.freezePointC) ? r.freezePointC : null;
  let how = 'measured freeze point';
  const over = haveGlycol && r.glycolPercent! > OVER_CONCENTRATION_PERCENT;
  if (fp === null) {
    fp = assessFreezeProtection(ctx.glycolType, r.glycolPercent!, 'volume').freezePointC;
    how = `freeze point of ${r.glycolPercent} % ${ctx.glycolType} glycol by volume (published table)`;
  }
  const overNote = over ? ` Above about ${OVER_CONCENTRATION_PERCENT} % glycol, more glycol protects less: dilute towards 50 %.` : '';
  if (ctx.designLowC === null) {
    return {
      ...base,
      status: 'unknown',
      value: fp,
      message: `No design low temperature is set for this site, so the ${how}${fp === null ? '' : ` (${both(fp)})`} cannot be judged.${overNote}`,
      action: "Ask an administrator to set the site's lowest expected temperature.",
    };
  }
  const need = ctx.designLowC - l.freezeMarginK;
  const needText = `design low ${both(ctx.designLowC)} less the ${l.freezeMarginK} K (${+(l.freezeMarginK * 1.8).toFixed(1)} °F) margin = ${both(need)}`;
  if (fp === null) {
    return {
      ...base,
      status: over ? 'high' : 'unknown',
      value: null,
      message: `${r.glycolPercent} % glycol is beyond the published table: its freeze point is not known (${needText}).${overNote}`,
      action: 'Measure the freeze point with a refractometer and correct the mix towards 50 %.',
    };
  }
  if (fp <= need) {
    return {
      ...base,
      status: over ? 'high' : 'ok',
      value: fp,
      message: `Freeze protection ${both(fp)} (${how}) meets the ${needText}.${overNote}`,
      action: over ? 'Dilute towards 50 % glycol with water (see the mix correction).' : 'No action.',
    };
  }
  let target: string;
  try {
    const p = percentForFreezePoint(ctx.glycolType, need, 'volume');
    target =
      p > OVER_CONCENTRATION_PERCENT
        ? `${ctx.glycolType} glycol cannot reach ${both(need)} at ${OVER_CONCENTRATION_PERCENT} % or less: take advice on the coolant or the design temperature.`
        : `Raise the glycol to at least ${p.toFixed(1)} % by volume (see the mix correction) and test again.`;
  } catch {
    target = `${ctx.glycolType} glycol cannot reach ${both(need)} within the published table: take advice on the coolant or the design temperature.`;
  }
  return {
    ...base,
    status: 'short',
    value: fp,
    message: `Freeze protection short: ${both(fp)} (${how}) is warmer than the ${needText}. The coolant could freeze, crack the block or radiator and stop the engine starting.`,
    action: `${target}${over ? overNote : ''}`,
  };
}

function breakdown(signs: readonly BreakdownSign[], phValue: number | null, l: ChemistryLimits): ChemistryFinding {
  const base = { field: 'breakdownSigns' as const, value: null, source: CHEMISTRY_LIMIT_SOURCES.breakdown };
  const phLow = phValue !== null && phValue < l.phLow;
  if (!signs.length) {
    return {
      ...base,
      status: phLow ? 'unknown' : 'ok',
      message: phLow
        ? `No sign of glycol breakdown seen, but the pH is low (${phValue}): breakdown acids can be present before they show.`
        : 'No sign of glycol breakdown seen (smell, colour, sludge).',
      action: phLow ? 'Have a laboratory check the sample for glycol breakdown products (organic acids).' : 'No action.',
    };
  }
  const seen = signs.map((s) => BREAKDOWN_SIGN_TEXT[s]).join(', ');
  return {
    ...base,
    status: 'signs',
    message: `Signs of glycol breakdown: ${seen}${phLow ? `, with a low pH (${phValue})` : ''}. Overheated or aerated glycol turns into organic acids (glycolic, formic, acetic) that use up the additive and the alkaline buffer and then attack iron, copper, solder and aluminium.`,
    action:
      'Have a laboratory confirm (pH, reserve alkalinity, breakdown acids); plan a drain, flush and refill with new coolant; find the cause (overheating, air drawn in at a pump seal or a low level, exhaust gas in the coolant).',
  };
}

/** Extended-life coolants differ (some carry no nitrite at all): the conventional limits would mislead. */
function notForElc(field: 'nitritePpm' | 'molybdatePpm', name: string, v: number): ChemistryFinding {
  return {
    field,
    status: 'unknown',
    value: v,
    source: "extended-life coolant: the coolant maker's figures",
    message: `${name} ${v} ppm in extended-life coolant: the limits here are for conventional coolant, and some extended-life coolants carry none.`,
    action: "Compare with the coolant maker's figures or the laboratory's judgement; add extender only as the coolant maker says.",
  };
}

/** One finding per measured field (nitrite, molybdate, pH, reserve alkalinity, glycol-breakdown signs, freeze protection). */
export function judgeChemistry(reading: ChemistryReading, ctx: ChemistryContext, limits?: Partial<ChemistryLimits> | null): ChemistryFinding[] {
  const l = resolveChemistryLimits(limits);
  if (ctx.designLowC !== null) requireFinite('designLowC', ctx.designLowC);
  const out: ChemistryFinding[] = [];
  const elc = ctx.coolantFamily === 'extended-life';
  if (present(reading.nitritePpm)) {
    const v = requireInRange('nitritePpm', reading.nitritePpm, 0, 100000, 'ppm');
    out.push(elc ? notForElc('nitritePpm', 'Nitrite', v) : nitrite(v, l));
  }
  if (present(reading.molybdatePpm)) {
    const v = requireInRange('molybdatePpm', reading.molybdatePpm, 0, 100000, 'ppm');
    out.push(elc ? notForElc('molybdatePpm', 'Molybdate', v) : molybdate(v, l));
  }
  if (present(reading.ph)) out.push(ph(requireInRange('ph', reading.ph, 0, 14), l));
  if (present(reading.reserveAlkalinityMl)) out.push(reserveAlkalinity(requireInRange('reserveAlkalinityMl', reading.reserveAlkalinityMl, 0, 100, 'mL'), l));
  if (reading.breakdownSigns !== null && reading.breakdownSigns !== undefined) {
    if (!Array.isArray(reading.breakdownSigns)) throw new CoolantInputError('breakdownSigns', 'must be a list of signs');
    for (const s of reading.breakdownSigns) {
      if (!BREAKDOWN_SIGNS.includes(s)) throw new CoolantInputError('breakdownSigns', `unknown sign "${String(s)}" (one of ${BREAKDOWN_SIGNS.join(', ')})`);
    }
    out.push(breakdown([...new Set(reading.breakdownSigns)], present(reading.ph) ? reading.ph : null, l));
  }
  const f = freezeProtection(reading, ctx, l);
  if (f) out.push(f);
  return out;
}
