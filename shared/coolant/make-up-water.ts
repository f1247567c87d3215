/**
 * Checks water meant for mixing coolant against published limits: ASTM D6210 appendix X1 and ASTM D4985
 * (as reproduced in US Army TM 5-3895-383-24, table 15): chloride <= 40 mg/L, sulfate <= 100 mg/L,
 * total hardness <= 170 mg/L as CaCO3, total dissolved solids <= 340 mg/L, pH 5.5 to 9.0.
 * When TDS is not measured it is estimated from conductivity, TDS ~ k x EC with k = 0.55 to 0.7
 * (Standard Methods for the Examination of Water and Wastewater, 1030E): an estimate, given as a range.
 */
import { requireInRange } from './validate';

export const MAKE_UP_WATER_LIMITS = Object.freeze({
  chlorideMgL: 40,
  sulfateMgL: 100,
  hardnessMgLCaCO3: 170,
  tdsMgL: 340,
  pHMin: 5.5,
  pHMax: 9.0,
});
export const MAKE_UP_WATER_SOURCE = 'ASTM D6210 appendix X1 / ASTM D4985';
/** TDS / conductivity ratio range, Standard Methods 1030E. */
export const TDS_PER_CONDUCTIVITY = Object.freeze({ low: 0.55, high: 0.7 });

export interface MakeUpWaterSample {
  chlorideMgL?: number;
  sulfateMgL?: number;
  /** Total hardness, mg/L as CaCO3. */
  hardnessMgLCaCO3?: number;
  /** Measured total dissolved solids, mg/L. */
  tdsMgL?: number;
  pH?: number;
  /** Electrical conductivity at 25 °C, µS/cm; used for a TDS estimate when TDS is not measured. */
  conductivityUsCm?: number;
}

export type WaterItemField = 'chlorideMgL' | 'sulfateMgL' | 'hardnessMgLCaCO3' | 'tdsMgL' | 'pH';
/** pass / fail; uncertain when an estimated range straddles the limit; not-measured when absent. */
export type WaterItemStatus = 'pass' | 'fail' | 'uncertain' | 'not-measured';

export interface WaterItemResult {
  field: WaterItemField;
  label: string;
  status: WaterItemStatus;
  /** The measured value, or the middle of the estimate. */
  value: number | null;
  unit: string;
  limit: string;
  /** True when the value is estimated (TDS from conductivity). */
  estimated: boolean;
  /** For estimates: the low and high ends. */
  range: { low: number; high: number } | null;
  reason: string;
}

export interface MakeUpWaterResult {
  /** acceptable: every item measured and within limits; not-acceptable: any item fails; incomplete otherwise. */
  verdict: 'acceptable' | 'not-acceptable' | 'incomplete';
  items: WaterItemResult[];
  failures: string[];
  source: string;
}

const MAX_MG_L = 1e6;

function upperLimitItem(field: WaterItemField, label: string, value: number | undefined, limit: number, unit: string, what: string): WaterItemResult {
  const base = { field, label, unit, limit: `<= ${limit} ${unit}`, estimated: false, range: null };
  if (value === undefined || value === null) {
    return { ...base, status: 'not-measured', value: null, reason: `${label} not measured.` };
  }
  const v = requireInRange(field, value, 0, MAX_MG_L, unit);
  if (v > limit) {
    return { ...base, status: 'fail', value: v, reason: `${label} ${v} ${unit} is above the limit of ${limit} ${unit}: ${what}` };
  }
  return { ...base, status: 'pass', value: v, reason: `${label} ${v} ${unit} is within the limit of ${limit} ${unit}.` };
}

/** Check a make-up water sample against the published limits, item by item. */
export function checkMakeUpWater(sample: MakeUpWaterSample): MakeUpWaterResult {
  const s = sample ?? {};
  const L = MAKE_UP_WATER_LIMITS;
  const items: WaterItemResult[] = [
    upperLimitItem('chlorideMgL', 'Chloride', s.chlorideMgL, L.chlorideMgL, 'mg/L', 'chloride attacks metals and speeds corrosion.'),
    upperLimitItem('sulfateMgL', 'Sulfate', s.sulfateMgL, L.sulfateMgL, 'mg/L', 'sulfate speeds corrosion and can form scale.'),
    upperLimitItem(
      'hardnessMgLCaCO3',
      'Total hardness',
      s.hardnessMgLCaCO3,
      L.hardnessMgLCaCO3,
      'mg/L as CaCO3',
      'calcium and magnesium form scale on hot surfaces and use up additive.',
    ),
  ];

  if (s.tdsMgL !== undefined && s.tdsMgL !== null) {
    items.push(upperLimitItem('tdsMgL', 'Total dissolved solids', s.tdsMgL, L.tdsMgL, 'mg/L', 'dissolved salts cause deposits and corrosion.'));
  } else if (s.conductivityUsCm !== undefined && s.conductivityUsCm !== null) {
    const ec = requireInRange('conductivityUsCm', s.conductivityUsCm, 0, 200000, 'µS/cm');
    const low = TDS_PER_CONDUCTIVITY.low * ec;
    const high = TDS_PER_CONDUCTIVITY.high * ec;
    const est = `estimated from ${ec} µS/cm as ${low.toFixed(0)} to ${high.toFixed(0)} mg/L (k = ${TDS_PER_CONDUCTIVITY.low} to ${TDS_PER_CONDUCTIVITY.high}, Standard Methods 1030E)`;
    const base = {
      field: 'tdsMgL' as const,
      label: 'Total dissolved solids',
      unit: 'mg/L',
      limit: `<= ${L.tdsMgL} mg/L`,
      estimated: true,
      range: { low, high },
      value: (low + high) / 2,
    };
    if (low > L.tdsMgL)
      items.push({ ...base, status: 'fail', reason: `TDS ${est} is above the limit of ${L.tdsMgL} mg/L: dissolved salts cause deposits and corrosion.` });
    else if (high <= L.tdsMgL) items.push({ ...base, status: 'pass', reason: `TDS ${est} is within the limit of ${L.tdsMgL} mg/L.` });
    else items.push({ ...base, status: 'uncertain', reason: `TDS ${est} straddles the limit of ${L.tdsMgL} mg/L: measure TDS to decide.` });
  } else {
    items.push({
      field: 'tdsMgL',
      label: 'Total dissolved solids',
      status: 'not-measured',
      value: null,
      unit: 'mg/L',
      limit: `<= ${L.tdsMgL} mg/L`,
      estimated: false,
      range: null,
      reason: 'TDS not measured (nor conductivity to estimate it).',
    });
  }

  const pHBase = { field: 'pH' as const, label: 'pH', unit: '', limit: `${L.pHMin} to ${L.pHMax}`, estimated: false, range: null };
  if (s.pH === undefined || s.pH === null) {
    items.push({ ...pHBase, status: 'not-measured', value: null, reason: 'pH not measured.' });
  } else {
    const pH = requireInRange('pH', s.pH, 0, 14);
    if (pH < L.pHMin) items.push({ ...pHBase, status: 'fail', value: pH, reason: `pH ${pH} is below ${L.pHMin}: acid water corrodes the cooling system.` });
    else if (pH > L.pHMax)
      items.push({ ...pHBase, status: 'fail', value: pH, reason: `pH ${pH} is above ${L.pHMax}: alkaline water can form scale and attack aluminium.` });
    else items.push({ ...pHBase, status: 'pass', value: pH, reason: `pH ${pH} is within ${L.pHMin} to ${L.pHMax}.` });
  }

  const failures = items.filter((i) => i.status === 'fail').map((i) => i.reason);
  const verdict = failures.length > 0 ? 'not-acceptable' : items.every((i) => i.status === 'pass') ? 'acceptable' : 'incomplete';
  return { verdict, items, failures, source: MAKE_UP_WATER_SOURCE };
}
