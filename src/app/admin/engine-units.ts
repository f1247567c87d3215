import { UNIT_SYMBOL, fromKpa, gallonsToLitres, litresToGallons, toCelsius, toKpa, fromCelsius } from '../../../shared/units';
import { UnitPreferences } from '../ui/unit-format';
import { Engine, EngineInput } from './admin-types';

/** Limits the server accepts, in SI (server/routes/engines.ts). */
export const ENGINE_LIMITS_SI = {
  capacityL: { min: 1, max: 5000 },
  glycolPercent: { min: 0, max: 70 },
  capPressureKpa: { min: 0, max: 300 },
  oilDrainIntervalH: { min: 50, max: 5000 },
  runHours: { min: 0, max: 1_000_000 },
  safeOpenTempC: { min: 20, max: 70 },
  heaterSetpointC: { min: 5, max: 70 },
} as const;

/** The fields that are typed in the user's unit. */
export type UnitField = 'capacityL' | 'capPressureKpa' | 'safeOpenTempC' | 'heaterSetpointC';

const DECIMALS: Record<string, number> = { L: 1, gal: 2, kPa: 1, psi: 2, bar: 3, degC: 1, degF: 1 };

function unitOf(field: UnitField, prefs: UnitPreferences): string {
  if (field === 'capacityL') return prefs.volume;
  if (field === 'capPressureKpa') return prefs.pressure;
  return prefs.temperature;
}

export function unitLabel(field: UnitField, prefs: UnitPreferences): string {
  return UNIT_SYMBOL[unitOf(field, prefs)];
}

/** A stored SI value in the user's unit. */
export function siToDisplay(field: UnitField, si: number, prefs: UnitPreferences): number {
  if (field === 'capacityL') return prefs.volume === 'gal' ? litresToGallons(si) : si;
  if (field === 'capPressureKpa') return fromKpa(si, prefs.pressure);
  return fromCelsius(si, prefs.temperature);
}

/** A typed value in the user's unit back to SI. */
export function displayToSi(field: UnitField, shown: number, prefs: UnitPreferences): number {
  if (field === 'capacityL') return prefs.volume === 'gal' ? gallonsToLitres(shown) : shown;
  if (field === 'capPressureKpa') return toKpa(shown, prefs.pressure);
  return toCelsius(shown, prefs.temperature);
}

const roundTo = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d;

/** For showing in an input: converted and rounded to the unit's usual decimals. */
export function displayValue(field: UnitField, si: number, prefs: UnitPreferences): number {
  return roundTo(siToDisplay(field, si, prefs), DECIMALS[unitOf(field, prefs)] ?? 2);
}

/** The server's limits in the user's unit, rounded inwards so a value inside them is inside the SI limits too. */
export function displayLimits(field: UnitField, prefs: UnitPreferences): { min: number; max: number } {
  const d = DECIMALS[unitOf(field, prefs)] ?? 2;
  const f = 10 ** d;
  const si = ENGINE_LIMITS_SI[field];
  return { min: Math.ceil(siToDisplay(field, si.min, prefs) * f - 1e-9) / f, max: Math.floor(siToDisplay(field, si.max, prefs) * f + 1e-9) / f };
}

/** What the engine form holds: unit fields in the user's units, the rest as stored. */
export interface EngineFormValue {
  siteId: number | null;
  name: string;
  duty: EngineInput['duty'];
  coolantFamily: EngineInput['coolantFamily'];
  glycolType: EngineInput['glycolType'];
  glycolPercent: number | null;
  capacityL: number | null;
  capPressureKpa: number | null;
  oilDrainIntervalH: number | null;
  runHours: number | null;
  safeOpenTempC: number | null;
  hasHeater: boolean;
  heaterSetpointC: number | null;
  outOfService: boolean;
}

/** Form values for an engine (or the defaults for a new one), in the user's units. */
export function engineToForm(engine: Engine | null, prefs: UnitPreferences): EngineFormValue {
  const e = engine;
  return {
    siteId: e?.siteId ?? null,
    name: e?.name ?? '',
    duty: e?.duty ?? 'standby',
    coolantFamily: (e?.coolantFamily as EngineInput['coolantFamily']) ?? 'conventional',
    glycolType: (e?.glycolType as EngineInput['glycolType']) ?? 'ethylene',
    glycolPercent: e?.glycolPercent ?? 50,
    capacityL: e ? displayValue('capacityL', e.capacityL, prefs) : null,
    capPressureKpa: displayValue('capPressureKpa', e?.capPressureKpa ?? 100, prefs),
    oilDrainIntervalH: e?.oilDrainIntervalH ?? 250,
    runHours: e?.runHours ?? 0,
    safeOpenTempC: displayValue('safeOpenTempC', e?.safeOpenTempC ?? 50, prefs),
    hasHeater: e ? e.heaterSetpointC !== null : false,
    heaterSetpointC: e?.heaterSetpointC != null ? displayValue('heaterSetpointC', e.heaterSetpointC, prefs) : null,
    outOfService: e?.outOfService ?? false,
  };
}

/** The API body for the chosen fields, converted to SI. Rounded to 0.001 so a conversion leaves no float noise. */
export function formToInput(v: EngineFormValue, prefs: UnitPreferences, fields?: ReadonlySet<keyof EngineInput>): Partial<EngineInput> {
  const si = (f: UnitField, shown: number | null) => (shown === null ? null : roundTo(displayToSi(f, Number(shown), prefs), 3));
  const all: EngineInput = {
    siteId: Number(v.siteId),
    name: v.name.trim(),
    duty: v.duty,
    coolantFamily: v.coolantFamily,
    glycolType: v.glycolType,
    glycolPercent: Number(v.glycolPercent),
    capacityL: si('capacityL', v.capacityL)!,
    capPressureKpa: si('capPressureKpa', v.capPressureKpa)!,
    oilDrainIntervalH: Number(v.oilDrainIntervalH),
    runHours: Number(v.runHours),
    safeOpenTempC: si('safeOpenTempC', v.safeOpenTempC)!,
    heaterSetpointC: v.hasHeater ? si('heaterSetpointC', v.heaterSetpointC) : null,
    outOfService: v.outOfService,
  };
  if (!fields) return all;
  const out: Partial<EngineInput> = {};
  for (const k of fields) (out as Record<string, unknown>)[k] = all[k];
  return out;
}
