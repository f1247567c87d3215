import { KPA_PER_BAR, KPA_PER_PSI, UNIT_SYMBOL, cToF, fToC } from '../../../shared/units';
import { UnitPreferences } from '../ui/unit-format';

/** How a rule parameter is typed: an absolute value of the channel, a difference (or rate) of it, or a plain number. */
export type ParamKind = 'absolute' | 'difference' | 'rate' | 'plain';

export interface ParamField {
  name: string;
  label: string;
  kind: ParamKind;
  /** For plain numbers, the unit shown beside the field. */
  unit?: string;
}

const DELAYS: ParamField[] = [
  { name: 'onDelayS', label: 'On-delay', kind: 'plain', unit: 's' },
  { name: 'offDelayS', label: 'Off-delay', kind: 'plain', unit: 's' },
];

/** The editable parameters of each rule kind (server/services/alarms/rule-definitions.ts), SI in the API. */
export const PARAM_FIELDS: Record<string, ParamField[]> = {
  limit: [{ name: 'limit', label: 'Limit', kind: 'absolute' }, { name: 'deadband', label: 'Deadband', kind: 'difference' }, ...DELAYS],
  rate: [
    { name: 'ratePerMin', label: 'Rate', kind: 'rate' },
    { name: 'deadbandPerMin', label: 'Deadband', kind: 'rate' },
    { name: 'windowS', label: 'Window', kind: 'plain', unit: 's' },
    ...DELAYS,
  ],
  boiling_margin: [{ name: 'marginC', label: 'Margin', kind: 'difference' }, { name: 'deadbandC', label: 'Deadband', kind: 'difference' }, ...DELAYS],
  conductivity: [
    { name: 'absoluteLimit', label: 'Limit', kind: 'absolute' },
    { name: 'risePercent', label: 'Rise over baseline', kind: 'plain', unit: '%' },
    { name: 'deadband', label: 'Deadband', kind: 'difference' },
    ...DELAYS,
  ],
  stuck: [
    { name: 'durationS', label: 'Unchanged for', kind: 'plain', unit: 's' },
    { name: 'epsilon', label: 'Counts as a change above', kind: 'difference' },
    { name: 'resolution', label: 'Sensor resolution (0 = learned)', kind: 'difference' },
  ],
  heater_loss: [
    { name: 'belowByC', label: 'Below the heater setpoint by', kind: 'difference' },
    { name: 'minDropC', label: 'Fallen at least', kind: 'difference' },
    { name: 'windowS', label: 'Over', kind: 'plain', unit: 's' },
  ],
  no_data: [
    { name: 'factor', label: 'Silence, times the usual interval', kind: 'plain', unit: '×' },
    { name: 'minSilenceS', label: 'At least', kind: 'plain', unit: 's' },
  ],
};

export function paramFields(kind: string): ParamField[] {
  return PARAM_FIELDS[kind] ?? [];
}

type Q = 'temperature' | 'pressure' | 'conductivity' | 'speed';

/** Quantity of a rule's numbers: a boiling margin is always a temperature. */
export function ruleQuantity(kind: string, channelQuantity: Q): Q {
  return kind === 'boiling_margin' ? 'temperature' : channelQuantity;
}

function factor(q: Q, prefs: UnitPreferences): number {
  if (q === 'temperature') return prefs.temperature === 'degF' ? 9 / 5 : 1;
  if (q === 'pressure') return prefs.pressure === 'psi' ? 1 / KPA_PER_PSI : prefs.pressure === 'bar' ? 1 / KPA_PER_BAR : 1;
  return 1;
}

export function paramUnit(field: ParamField, q: Q, prefs: UnitPreferences): string {
  if (field.kind === 'plain') return field.unit ?? '';
  const base = q === 'temperature' ? prefs.temperature : q === 'pressure' ? prefs.pressure : q === 'conductivity' ? 'uS/cm' : 'rpm';
  return UNIT_SYMBOL[base] + (field.kind === 'rate' ? '/min' : '');
}

const round = (v: number) => Math.round(v * 1000) / 1000;

/** SI (stored) value to what the user types. */
export function toDisplay(si: number, field: ParamField, q: Q, prefs: UnitPreferences): number {
  if (field.kind === 'plain') return si;
  if (field.kind === 'absolute' && q === 'temperature' && prefs.temperature === 'degF') return round(cToF(si));
  return round(si * factor(q, prefs));
}

/** What the user typed back to SI, rounded to 0.001 so a round trip leaves no float noise. */
export function toSi(shown: number, field: ParamField, q: Q, prefs: UnitPreferences): number {
  if (field.kind === 'plain') return shown;
  if (field.kind === 'absolute' && q === 'temperature' && prefs.temperature === 'degF') return round(fToC(shown));
  return round(shown / factor(q, prefs));
}
