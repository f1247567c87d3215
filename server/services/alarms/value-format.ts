/** Alarm values with their units, metric first and US beside it, for e-mail and messages. */
import { cToF, deltaCToF, KPA_PER_PSI } from '../../../shared/units';

/** Unit of the value an alarm of this rule kind carries. */
export function alarmUnit(kind: string, channelUnit: string): string | null {
  if (kind === 'no_data') return null;
  if (kind === 'rate') return `${channelUnit}/min`;
  if (kind === 'boiling_margin') return 'K'; // a temperature difference (margin), shown as °C
  return channelUnit;
}

const f1 = (n: number) => n.toFixed(1);

export function formatValue(value: number | null, unit: string | null): string {
  if (value === null || !Number.isFinite(value)) return 'no value';
  switch (unit) {
    case 'degC':
      return `${f1(value)} °C (${f1(cToF(value))} °F)`;
    case 'K':
      return `${f1(value)} °C (${f1(deltaCToF(value))} °F)`;
    case 'degC/min':
      return `${value.toFixed(2)} °C/min (${deltaCToF(value).toFixed(2)} °F/min)`;
    case 'kPa':
      return `${f1(value)} kPa (${(value / KPA_PER_PSI).toFixed(2)} psi)`;
    case 'kPa/min':
      return `${value.toFixed(2)} kPa/min (${(value / KPA_PER_PSI).toFixed(3)} psi/min)`;
    case 'uS/cm':
      return `${value.toFixed(0)} µS/cm`;
    case 'rpm':
      return `${value.toFixed(0)} rpm`;
    default:
      return unit ? `${f1(value)} ${unit}` : f1(value);
  }
}
