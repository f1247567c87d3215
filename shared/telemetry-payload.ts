/**
 * The MQTT telemetry payload contract (see DEVELOPERS.md, "MQTT contract").
 * Pure: no I/O, so the broker, the external-broker subscriber and tests share it.
 *
 * One bad sample or value rejects only itself; every good value around it is accepted.
 */
import { z } from 'zod';
import { CHANNELS, isChannelKey, QUALITY_BAD, QUALITY_GOOD, type ChannelKey, type Quantity } from './channels';
import { toCelsius, toKpa, toMicroSiemens, type ConductivityUnit, type PressureUnit, type TemperatureUnit } from './units';

/**
 * Byte limit of one payload. Chosen so that any batch within MAX_SAMPLES fits: 500 samples with all five
 * channels in the longer { value, unit } form, full-precision numbers and ISO timestamps with an offset
 * come to about 190 kB of compact JSON.
 */
export const MAX_PAYLOAD_BYTES = 256 * 1024;
export const MAX_SAMPLES = 500;
export const MAX_FUTURE_MS = 5 * 60 * 1000;
export const MAX_AGE_MS = 31 * 24 * 60 * 60 * 1000;

export type RejectReason =
  'not_json' | 'too_large' | 'schema' | 'not_finite' | 'future_timestamp' | 'old_timestamp' | 'unknown_channel' | 'bad_unit' | 'wrong_topic';

export const REJECT_REASONS: readonly RejectReason[] = [
  'not_json',
  'too_large',
  'schema',
  'not_finite',
  'future_timestamp',
  'old_timestamp',
  'unknown_channel',
  'bad_unit',
  'wrong_topic',
];

export interface ParsedReading {
  channel: ChannelKey;
  ts: number;
  /** In the stored unit of the channel. */
  value: number;
  quality: 0 | 1;
  /** True when the value lies outside the channel's physical range (then quality is 1). */
  outOfRange: boolean;
}

export interface PayloadReject {
  reason: RejectReason;
  detail: string;
}

export interface ParseResult {
  accepted: ParsedReading[];
  rejects: PayloadReject[];
}

/** Units a channel accepts, by quantity. */
export const UNITS_BY_QUANTITY: Record<Quantity, readonly string[]> = {
  temperature: ['degC', 'degF', 'K'],
  pressure: ['kPa', 'psi', 'bar'],
  conductivity: ['uS/cm', 'mS/cm'],
  speed: ['rpm'],
};

const timestampSchema = z.union([z.number(), z.string().max(40)]);
const valuesSchema = z.record(z.string(), z.unknown());
const sampleSchema = z.object({ ts: timestampSchema, values: valuesSchema });
const envelopeSchema = z.union([z.object({ samples: z.array(z.unknown()).min(1).max(MAX_SAMPLES) }), sampleSchema]);
const unitValueSchema = z.object({ value: z.unknown(), unit: z.string().max(16) });

export const telemetryPayloadSchema = envelopeSchema;

// ISO 8601 date-time with an explicit zone (Z or +hh:mm), as JSON writers produce it.
// TextDecoder rather than Buffer: this module also runs in the browser.
const UTF8 = new TextDecoder('utf-8');

const ISO_DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/;

function toMillis(ts: number | string): number | null {
  if (typeof ts === 'number') return Number.isSafeInteger(ts) && ts >= 0 ? ts : null;
  if (!ISO_DATE_TIME.test(ts)) return null;
  const ms = Date.parse(ts);
  return Number.isFinite(ms) ? ms : null;
}

function convert(quantity: Quantity, value: number, unit: string): number {
  switch (quantity) {
    case 'temperature':
      return toCelsius(value, unit as TemperatureUnit);
    case 'pressure':
      return toKpa(value, unit as PressureUnit);
    case 'conductivity':
      return toMicroSiemens(value, unit as ConductivityUnit);
    default:
      return value;
  }
}

function firstIssue(error: z.ZodError): string {
  const issue = error.issues[0];
  if (!issue) return 'invalid';
  const where = issue.path.length ? issue.path.join('.') + ': ' : '';
  return where + issue.message;
}

const isPlainObject = (x: unknown): x is Record<string, unknown> => typeof x === 'object' && x !== null && !Array.isArray(x);

/** The same shape as sampleSchema, checked without allocating. */
function isSampleShape(x: unknown): x is z.infer<typeof sampleSchema> {
  if (!isPlainObject(x)) return false;
  const ts = x.ts;
  return (typeof ts === 'number' || (typeof ts === 'string' && ts.length <= 40)) && isPlainObject(x.values);
}

/** Checks one sample and appends its good values and its rejects. */
function parseSample(raw: unknown, where: string, now: number, out: ParseResult): void {
  // Hot path: a plain shape check first; zod runs only on a failure, to name the problem.
  if (!isSampleShape(raw)) {
    const sample = sampleSchema.safeParse(raw);
    out.rejects.push({ reason: 'schema', detail: `${where}: ${sample.success ? 'invalid sample' : firstIssue(sample.error)}` });
    return;
  }
  const sample = { data: raw };
  const ts = toMillis(sample.data.ts);
  if (ts === null) {
    out.rejects.push({ reason: 'schema', detail: `${where}.ts: not epoch milliseconds or an ISO 8601 date-time` });
    return;
  }
  if (ts > now + MAX_FUTURE_MS) {
    out.rejects.push({ reason: 'future_timestamp', detail: `${where}.ts: ${new Date(ts).toISOString()} is more than 5 minutes ahead` });
    return;
  }
  if (ts < now - MAX_AGE_MS) {
    out.rejects.push({ reason: 'old_timestamp', detail: `${where}.ts: ${new Date(ts).toISOString()} is older than 31 days` });
    return;
  }
  const values = sample.data.values;
  const keys = Object.keys(values);
  if (keys.length === 0) {
    out.rejects.push({ reason: 'schema', detail: `${where}.values: empty` });
    return;
  }
  for (const key of keys) {
    const at = `${where}.values.${key.slice(0, 40)}`;
    if (!isChannelKey(key)) {
      out.rejects.push({ reason: 'unknown_channel', detail: `${at}: no such channel` });
      continue;
    }
    const info = CHANNELS[key];
    const rawValue = values[key];
    let number: number;
    let unit: string = info.unit;
    if (typeof rawValue === 'number') {
      number = rawValue;
    } else {
      const withUnit = unitValueSchema.safeParse(rawValue);
      if (!withUnit.success || typeof withUnit.data.value !== 'number') {
        out.rejects.push({ reason: 'schema', detail: `${at}: expected a number or { value, unit }` });
        continue;
      }
      number = withUnit.data.value;
      unit = withUnit.data.unit;
    }
    // JSON.parse turns 1e999 into Infinity: a number that no sensor can send.
    if (!Number.isFinite(number)) {
      out.rejects.push({ reason: 'not_finite', detail: `${at}: not a finite number` });
      continue;
    }
    if (!UNITS_BY_QUANTITY[info.quantity].includes(unit)) {
      out.rejects.push({ reason: 'bad_unit', detail: `${at}: unit "${unit.slice(0, 16)}" not accepted (use ${UNITS_BY_QUANTITY[info.quantity].join(', ')})` });
      continue;
    }
    const value = convert(info.quantity, number, unit);
    const outOfRange = !(value >= info.physicalMin && value <= info.physicalMax);
    out.accepted.push({ channel: key, ts, value, quality: outOfRange ? QUALITY_BAD : QUALITY_GOOD, outOfRange });
  }
}

/**
 * Validates one telemetry payload published on `jw/v1/engines/{topicEngineId}/telemetry`.
 * `now` is the arrival time (ms) against which timestamps are judged.
 */
export function parseTelemetry(topicEngineId: number, payload: Uint8Array | string, now: number): ParseResult {
  const out: ParseResult = { accepted: [], rejects: [] };
  const size = typeof payload === 'string' ? new TextEncoder().encode(payload).byteLength : payload.byteLength;
  if (size > MAX_PAYLOAD_BYTES) {
    out.rejects.push({ reason: 'too_large', detail: `engine ${topicEngineId}: ${size} bytes, at most ${MAX_PAYLOAD_BYTES}` });
    return out;
  }
  let data: unknown;
  try {
    data = JSON.parse(typeof payload === 'string' ? payload : UTF8.decode(payload));
  } catch {
    out.rejects.push({ reason: 'not_json', detail: `engine ${topicEngineId}: payload is not JSON` });
    return out;
  }
  const envelope = envelopeSchema.safeParse(data);
  if (!envelope.success) {
    out.rejects.push({ reason: 'schema', detail: `engine ${topicEngineId}: expected { ts, values } or { samples: [...] } (at most ${MAX_SAMPLES} samples)` });
    return out;
  }
  if ('samples' in envelope.data) {
    const samples = envelope.data.samples;
    for (let i = 0; i < samples.length; i++) parseSample(samples[i], `samples[${i}]`, now, out);
  } else {
    parseSample(envelope.data, 'payload', now, out);
  }
  return out;
}
