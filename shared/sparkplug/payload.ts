/**
 * Decoding of Sparkplug B payloads into plain values. Pure: protobufjs over the schema text in
 * schema.ts, no I/O. A metric's value is read by the data type of its birth certificate, since data
 * messages usually leave the type out.
 */
import { DataType, sparkplugPayloadType } from './schema';

/** Births carry every metric with its name, type and properties: allow more than our JSON limit. */
export const MAX_SPARKPLUG_BYTES = 64 * 1024;

export type RawValue =
  | { field: 'int_value'; value: number }
  | { field: 'long_value'; value: string }
  | { field: 'float_value' | 'double_value'; value: number }
  | { field: 'boolean_value'; value: boolean }
  | { field: 'string_value'; value: string }
  | { field: 'bytes_value'; value: Uint8Array }
  | { field: null; value: null };

export interface SparkplugMetric {
  name: string | null;
  /** uint64 in decimal text (Map keys stay exact). */
  alias: string | null;
  ts: number | null;
  datatype: number | null;
  isHistorical: boolean;
  isTransient: boolean;
  isNull: boolean;
  raw: RawValue;
  /** Engineering unit from the metric's properties (`engUnit`, or `unit`), if any. */
  unit: string | null;
}

export interface SparkplugPayload {
  ts: number | null;
  seq: number | null;
  metrics: SparkplugMetric[];
}

export type DecodeResult = { ok: true; payload: SparkplugPayload } | { ok: false; reason: 'too_large' | 'sparkplug_decode'; detail: string };

const VALUE_FIELDS = ['int_value', 'long_value', 'float_value', 'double_value', 'boolean_value', 'string_value', 'bytes_value'] as const;
const UNIT_KEYS = ['engUnit', 'unit'];

type Obj = Record<string, unknown>;
const num = (x: unknown): number | null => (x === undefined || x === null ? null : Number(x));

function rawOf(m: Obj): RawValue {
  for (const f of VALUE_FIELDS) {
    if (m[f] !== undefined && m[f] !== null) return { field: f, value: m[f] } as RawValue;
  }
  return { field: null, value: null };
}

function unitOf(m: Obj): string | null {
  const props = m.properties as { keys?: string[]; values?: Obj[] } | undefined;
  if (!props?.keys) return null;
  for (let i = 0; i < props.keys.length; i++) {
    if (!UNIT_KEYS.includes(props.keys[i])) continue;
    const v = props.values?.[i];
    if (v && typeof v.string_value === 'string') return v.string_value;
  }
  return null;
}

export function decodeSparkplugPayload(bytes: Uint8Array): DecodeResult {
  if (bytes.byteLength > MAX_SPARKPLUG_BYTES) return { ok: false, reason: 'too_large', detail: `${bytes.byteLength} bytes, at most ${MAX_SPARKPLUG_BYTES}` };
  const type = sparkplugPayloadType();
  let obj: Obj;
  try {
    obj = type.toObject(type.decode(bytes), { longs: String, defaults: false }) as Obj;
  } catch (err) {
    return { ok: false, reason: 'sparkplug_decode', detail: `not a Sparkplug B payload: ${(err as Error).message.slice(0, 120)}` };
  }
  const metrics = ((obj.metrics as Obj[] | undefined) ?? []).map((m): SparkplugMetric => ({
    name: typeof m.name === 'string' ? m.name : null,
    alias: m.alias === undefined ? null : String(m.alias),
    ts: num(m.timestamp),
    datatype: num(m.datatype),
    isHistorical: m.is_historical === true,
    isTransient: m.is_transient === true,
    isNull: m.is_null === true,
    raw: rawOf(m),
    unit: unitOf(m),
  }));
  return { ok: true, payload: { ts: num(obj.timestamp), seq: num(obj.seq), metrics } };
}

export type MetricValue = { kind: 'number'; value: number } | { kind: 'boolean'; value: boolean } | { kind: 'other'; what: string } | { kind: 'null' };

/**
 * The value of a metric read as `datatype` (Sparkplug 3.0: signed 8/16/32-bit integers travel as the
 * two's complement in the uint32 int_value, Int64 likewise in the uint64 long_value).
 */
export function metricValue(raw: RawValue, datatype: number | null): MetricValue {
  switch (raw.field) {
    case null:
      return { kind: 'null' };
    case 'int_value': {
      const v = raw.value >>> 0;
      if (datatype === DataType.Int8) return { kind: 'number', value: (v << 24) >> 24 };
      if (datatype === DataType.Int16) return { kind: 'number', value: (v << 16) >> 16 };
      if (datatype === DataType.Int32) return { kind: 'number', value: v | 0 };
      return { kind: 'number', value: v };
    }
    case 'long_value': {
      const big = BigInt(raw.value);
      return { kind: 'number', value: Number(datatype === DataType.Int64 ? BigInt.asIntN(64, big) : BigInt.asUintN(64, big)) };
    }
    case 'float_value':
    case 'double_value':
      return { kind: 'number', value: raw.value };
    case 'boolean_value':
      return { kind: 'boolean', value: raw.value };
    case 'string_value':
      return { kind: 'other', what: 'a string' };
    case 'bytes_value':
      return { kind: 'other', what: 'bytes' };
  }
}
