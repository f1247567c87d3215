/**
 * Freeze point of water-glycol coolant from published tables, by shape-preserving (monotone) interpolation.
 *
 * Tables (see shared/reference/coolant-references.md):
 * - ethylene glycol, % by mass: ASHRAE Handbook - Fundamentals (2009), ch. 31, table 4;
 * - propylene glycol, % by volume: Lange's Handbook of Chemistry, 15th ed. (1999), table 5.13.
 * Both start at 0 % -> 0 °C, the ice point of water at one atmosphere.
 * Both are extended to cover 0-60 % on either basis with points computed from CoolProp 8.0 (incompressible
 * mixtures `AEG` and `APG`, its polynomial fits of ASHRAE Fundamentals glycol data, by volume; computed outside
 * the project): ethylene 60 vol % -> -52.0 °C, propylene 55 vol % -> -41.6 °C and 60 vol % -> -51.1 °C.
 * Each point carries its own source (`pointSources`).
 * The other two bases are reached by converting volume <-> mass fraction with the densities of the pure
 * liquids at 20 °C (CRC Handbook of Chemistry and Physics), which neglects the volume contraction on mixing
 * (a few tenths of a percentage point at 50 %).
 */
import { monotoneCurve } from './monotone-interpolation';
import { CoolantInputError, requireFinite, requireInRange, requireOneOf } from './validate';

export type GlycolType = 'ethylene' | 'propylene';
export type ConcentrationBasis = 'volume' | 'mass';
export const GLYCOL_TYPES: readonly GlycolType[] = ['ethylene', 'propylene'];
export const CONCENTRATION_BASES: readonly ConcentrationBasis[] = ['volume', 'mass'];

/** Densities at 20 °C in g/cm3 (CRC Handbook of Chemistry and Physics). */
export const DENSITY_G_CM3 = { water: 0.9982, ethylene: 1.1132, propylene: 1.0361 } as const;
/** Molar masses in g/mol (IUPAC standard atomic weights): H2O, C2H6O2, C3H8O2. */
export const MOLAR_MASS_G_MOL = { water: 18.015, ethylene: 62.068, propylene: 76.095 } as const;
/** Melting point of pure ethane-1,2-diol, °C (CRC Handbook). */
export const PURE_ETHYLENE_GLYCOL_MELTING_C = -12.9;
/** Above about this share, more glycol protects less (the freeze curve turns back up towards the pure glycol). */
export const OVER_CONCENTRATION_PERCENT = 60;

interface FreezeTable {
  basis: ConcentrationBasis;
  percent: number[];
  freezeC: number[];
  /** Where each point comes from (same order as percent). */
  pointSources: string[];
  source: string;
}

const ASHRAE_EG = 'ASHRAE Fundamentals 2009 ch. 31 table 4';
const LANGE_PG = "Lange's 15th ed. table 5.13";
const COOLPROP_AEG = 'CoolProp 8.0 INCOMP::AEG (fit of ASHRAE data, vol %), 60 vol % = 62.6 mass % by the CRC densities';
const COOLPROP_APG = 'CoolProp 8.0 INCOMP::APG (fit of ASHRAE data, vol %)';
/** 60 % by volume of ethylene glycol on the mass basis of the ASHRAE table (CRC densities, ideal mixing). */
const EG_60_VOL_AS_MASS = (100 * 0.6 * 1.1132) / (0.6 * 1.1132 + 0.4 * 0.9982);

const TABLES: Record<GlycolType, FreezeTable> = {
  ethylene: {
    basis: 'mass',
    percent: [0, 10, 20, 30, 40, 50, 60, EG_60_VOL_AS_MASS],
    freezeC: [0, -3.3, -7.8, -14.0, -22.5, -33.8, -48.5, -52.0],
    pointSources: ['ice point', ASHRAE_EG, ASHRAE_EG, ASHRAE_EG, ASHRAE_EG, ASHRAE_EG, ASHRAE_EG, COOLPROP_AEG],
    source: 'ASHRAE Handbook - Fundamentals (2009), ch. 31, table 4 (ethylene glycol, % by mass, to 60 %); 60 % by volume from CoolProp 8.0 AEG (ASHRAE fit)',
  },
  propylene: {
    basis: 'volume',
    percent: [0, 10, 20, 30, 40, 50, 55, 60],
    freezeC: [0, -2.2, -6.7, -12.8, -20.6, -33.3, -41.6, -51.1],
    pointSources: ['ice point', LANGE_PG, LANGE_PG, LANGE_PG, LANGE_PG, LANGE_PG, COOLPROP_APG, COOLPROP_APG],
    source: "Lange's Handbook of Chemistry, 15th ed. (1999), table 5.13 (propylene glycol, % by volume, to 50 %); 55-60 % from CoolProp 8.0 APG (ASHRAE fit)",
  },
};

const CURVES = {
  ethylene: monotoneCurve(TABLES.ethylene.percent, TABLES.ethylene.freezeC),
  propylene: monotoneCurve(TABLES.propylene.percent, TABLES.propylene.freezeC),
};

/** The published table behind a glycol type (a copy), with its own basis and source. */
export function freezeTable(glycol: GlycolType): Readonly<FreezeTable> {
  const t = TABLES[requireOneOf('glycol', glycol, GLYCOL_TYPES)];
  return { ...t, percent: [...t.percent], freezeC: [...t.freezeC], pointSources: [...t.pointSources] };
}

/** Volume % of glycol -> mass % (ideal mixing: no volume contraction). */
export function volumeToMassPercent(glycol: GlycolType, volumePercent: number): number {
  requireOneOf('glycol', glycol, GLYCOL_TYPES);
  const v = requireInRange('percent', volumePercent, 0, 100, '%') / 100;
  const mg = v * DENSITY_G_CM3[glycol];
  const mw = (1 - v) * DENSITY_G_CM3.water;
  return (100 * mg) / (mg + mw);
}

/** Mass % of glycol -> volume % (ideal mixing: no volume contraction). */
export function massToVolumePercent(glycol: GlycolType, massPercent: number): number {
  requireOneOf('glycol', glycol, GLYCOL_TYPES);
  const w = requireInRange('percent', massPercent, 0, 100, '%') / 100;
  const vg = w / DENSITY_G_CM3[glycol];
  const vw = (1 - w) / DENSITY_G_CM3.water;
  return (100 * vg) / (vg + vw);
}

/** Convert a glycol share between bases. */
export function convertPercent(glycol: GlycolType, percent: number, from: ConcentrationBasis, to: ConcentrationBasis): number {
  requireOneOf('basis', from, CONCENTRATION_BASES);
  requireOneOf('basis', to, CONCENTRATION_BASES);
  if (from === to) return requireInRange('percent', percent, 0, 100, '%');
  return from === 'volume' ? volumeToMassPercent(glycol, percent) : massToVolumePercent(glycol, percent);
}

/** Water mole fraction of the mix (used by the boiling-point correction). */
export function waterMoleFraction(glycol: GlycolType, percent: number, basis: ConcentrationBasis): number {
  const w = convertPercent(glycol, percent, basis, 'mass') / 100;
  const nw = (1 - w) / MOLAR_MASS_G_MOL.water;
  const ng = w / MOLAR_MASS_G_MOL[glycol];
  return nw / (nw + ng);
}

/** Highest glycol share the published table covers, on the requested basis. */
export function tableMaxPercent(glycol: GlycolType, basis: ConcentrationBasis): number {
  const t = TABLES[requireOneOf('glycol', glycol, GLYCOL_TYPES)];
  requireOneOf('basis', basis, CONCENTRATION_BASES);
  return convertPercent(glycol, t.percent[t.percent.length - 1], t.basis, basis);
}

/**
 * Freeze point in °C of a glycol share within the published table.
 * Throws a RangeError naming `percent` outside 0 .. table maximum (see assessFreezeProtection for strong mixes).
 */
export function freezePointC(glycol: GlycolType, percent: number, basis: ConcentrationBasis): number {
  requireOneOf('glycol', glycol, GLYCOL_TYPES);
  requireOneOf('basis', basis, CONCENTRATION_BASES);
  const max = tableMaxPercent(glycol, basis);
  // Tolerance so that the converted table end (e.g. 60.93 mass % of propylene glycol) is itself accepted.
  const p = requireFinite('percent', percent);
  if (p < 0 || p > max + 1e-9) {
    throw new CoolantInputError('percent', `the published ${glycol} glycol table covers 0 to ${max.toFixed(1)} % by ${basis} (got ${p} %)`);
  }
  const t = TABLES[glycol];
  const x = Math.min(convertPercent(glycol, p, basis, t.basis), t.percent[t.percent.length - 1]);
  return CURVES[glycol].at(x);
}

/**
 * Glycol share needed for a freeze point at or below designLowC (°C), on the requested basis.
 * 0 when designLowC is at or above 0 °C. RangeError naming `designLowC` beyond the table.
 */
export function percentForFreezePoint(glycol: GlycolType, designLowC: number, basis: ConcentrationBasis): number {
  requireOneOf('glycol', glycol, GLYCOL_TYPES);
  requireOneOf('basis', basis, CONCENTRATION_BASES);
  const target = requireFinite('designLowC', designLowC);
  const t = TABLES[glycol];
  const coldest = t.freezeC[t.freezeC.length - 1];
  if (target < coldest) {
    throw new CoolantInputError('designLowC', `the published ${glycol} glycol table reaches only ${coldest} °C (got ${target} °C)`);
  }
  if (target >= 0) return 0;
  // The curve falls monotonically with concentration: bisection on the table's own basis.
  let lo = 0;
  let hi = t.percent[t.percent.length - 1];
  for (let i = 0; i < 100 && hi - lo > 1e-10; i++) {
    const mid = (lo + hi) / 2;
    if (CURVES[glycol].at(mid) > target) lo = mid;
    else hi = mid;
  }
  return convertPercent(glycol, hi, t.basis, basis);
}

export interface FreezeAssessment {
  glycol: GlycolType;
  percent: number;
  basis: ConcentrationBasis;
  /** Freeze point from the table, °C; null where the share lies beyond the published table. */
  freezePointC: number | null;
  /** Glycol share above about 60 %: more glycol now protects less. */
  overConcentrated: boolean;
  /** Highest share the table covers, on this basis. */
  tableMaxPercent: number;
  warnings: string[];
  source: string;
}

/** Freeze protection of any mix 0..100 %, with warnings for strong mixes and shares beyond the table. */
export function assessFreezeProtection(glycol: GlycolType, percent: number, basis: ConcentrationBasis): FreezeAssessment {
  requireOneOf('glycol', glycol, GLYCOL_TYPES);
  requireOneOf('basis', basis, CONCENTRATION_BASES);
  const p = requireInRange('percent', percent, 0, 100, '%');
  const max = tableMaxPercent(glycol, basis);
  const warnings: string[] = [];
  const overConcentrated = p > OVER_CONCENTRATION_PERCENT;
  let fp: number | null = null;
  if (p <= max + 1e-9) {
    fp = freezePointC(glycol, p, basis);
  } else {
    warnings.push(`${p.toFixed(1)} % by ${basis} is beyond the published table (up to ${max.toFixed(1)} %): no freeze point is given.`);
  }
  if (overConcentrated) {
    const pure = glycol === 'ethylene' ? ` (pure ethylene glycol freezes at ${PURE_ETHYLENE_GLYCOL_MELTING_C} °C)` : '';
    warnings.push(`Above about ${OVER_CONCENTRATION_PERCENT} % glycol, more glycol protects less${pure}; dilute towards the target mix.`);
  }
  return { glycol, percent: p, basis, freezePointC: fp, overConcentrated, tableMaxPercent: max, warnings, source: TABLES[glycol].source };
}
