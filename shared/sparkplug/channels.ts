/**
 * From Sparkplug metrics to our channels: the name mapping (our channel keys by default, or a
 * device's own table), and the value check with unit conversion, as for our JSON payloads.
 */
import { CHANNELS, isChannelKey, QUALITY_BAD, QUALITY_GOOD, type ChannelKey } from '../channels';
import { MAX_AGE_MS, MAX_FUTURE_MS, UNITS_BY_QUANTITY, type ParsedReading } from '../telemetry-payload';
import { toCelsius, toKpa, toMicroSiemens, type ConductivityUnit, type PressureUnit, type TemperatureUnit } from '../units';

/** A device's metric names to our channels: `"Engine/Coolant/Temp": "coolant_temp"` or `{ channel, unit }`. */
export type MetricMap = Record<string, ChannelKey | { channel: ChannelKey; unit?: string }>;

export interface MappedMetric {
  channel: ChannelKey;
  /** Unit the mapping entry states, used when the metric carries none. */
  unit: string | null;
}

/** Names every edge node publishes for its own bookkeeping: never readings, never "unknown". */
export function isSparkplugControlMetric(name: string): boolean {
  return (
    name === 'bdSeq' ||
    name.startsWith('Node Control/') ||
    name.startsWith('Device Control/') ||
    name.startsWith('Properties/') ||
    name.startsWith('Node Info/')
  );
}

export function mapMetric(name: string, map: MetricMap | null): MappedMetric | null {
  const entry = map?.[name];
  if (entry !== undefined) return typeof entry === 'string' ? { channel: entry, unit: null } : { channel: entry.channel, unit: entry.unit ?? null };
  return isChannelKey(name) ? { channel: name, unit: null } : null;
}

/** Units as gateways often spell them, to our unit names. */
const UNIT_SPELLINGS: Record<string, string> = {
  '°C': 'degC',
  C: 'degC',
  '°F': 'degF',
  F: 'degF',
  kpa: 'kPa',
  PSI: 'psi',
  'µS/cm': 'uS/cm',
  RPM: 'rpm',
  'r/min': 'rpm',
};
export const normalizeUnit = (unit: string): string => UNIT_SPELLINGS[unit] ?? unit;

export type ValueCheck =
  { ok: true; reading: ParsedReading } | { ok: false; reason: 'not_finite' | 'bad_unit' | 'future_timestamp' | 'old_timestamp'; detail: string };

/** One metric value as a reading of `channel` in its stored unit (same limits as the JSON contract). */
export function checkMetricValue(channel: ChannelKey, value: number, unit: string | null, ts: number, now: number): ValueCheck {
  const info = CHANNELS[channel];
  if (!Number.isFinite(value)) return { ok: false, reason: 'not_finite', detail: `${channel}: not a finite number` };
  const u = unit === null ? info.unit : normalizeUnit(unit);
  if (!UNITS_BY_QUANTITY[info.quantity].includes(u)) {
    return { ok: false, reason: 'bad_unit', detail: `${channel}: unit "${u.slice(0, 16)}" not accepted (use ${UNITS_BY_QUANTITY[info.quantity].join(', ')})` };
  }
  if (ts > now + MAX_FUTURE_MS)
    return { ok: false, reason: 'future_timestamp', detail: `${channel}: ${new Date(ts).toISOString()} is more than 5 minutes ahead` };
  if (ts < now - MAX_AGE_MS) return { ok: false, reason: 'old_timestamp', detail: `${channel}: ${new Date(ts).toISOString()} is older than 31 days` };
  let stored = value;
  if (info.quantity === 'temperature') stored = toCelsius(value, u as TemperatureUnit);
  else if (info.quantity === 'pressure') stored = toKpa(value, u as PressureUnit);
  else if (info.quantity === 'conductivity') stored = toMicroSiemens(value, u as ConductivityUnit);
  const outOfRange = !(stored >= info.physicalMin && stored <= info.physicalMax);
  return { ok: true, reading: { channel, ts, value: stored, quality: outOfRange ? QUALITY_BAD : QUALITY_GOOD, outOfRange } };
}
