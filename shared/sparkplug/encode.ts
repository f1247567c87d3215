/** Encoding of Sparkplug B payloads (the server's rebirth command, the simulator's gateways). */
import { DataType, sparkplugPayloadType } from './schema';

export interface OutMetric {
  name?: string;
  alias?: number;
  timestamp?: number;
  datatype?: number;
  /** A number goes out as a Double, a boolean as a Boolean, unless `datatype` says otherwise. */
  value?: number | boolean;
  /** Engineering unit, sent as the property `engUnit`. */
  unit?: string;
}

export function encodeSparkplugPayload(p: { timestamp: number; seq?: number; metrics: OutMetric[] }): Uint8Array {
  const type = sparkplugPayloadType();
  const metrics = p.metrics.map((m) => {
    const out: Record<string, unknown> = {};
    if (m.name !== undefined) out.name = m.name;
    if (m.alias !== undefined) out.alias = m.alias;
    if (m.timestamp !== undefined) out.timestamp = m.timestamp;
    const datatype = m.datatype ?? (typeof m.value === 'boolean' ? DataType.Boolean : typeof m.value === 'number' ? DataType.Double : undefined);
    if (m.datatype !== undefined || m.name !== undefined) out.datatype = datatype;
    if (typeof m.value === 'boolean') out.boolean_value = m.value;
    else if (typeof m.value === 'number') {
      if (datatype === DataType.Float) out.float_value = m.value;
      else if (datatype === DataType.Int64 || datatype === DataType.UInt64) out.long_value = m.value;
      else if (datatype !== undefined && datatype >= DataType.Int8 && datatype <= DataType.UInt32) out.int_value = m.value >>> 0;
      else out.double_value = m.value;
    }
    if (m.unit) out.properties = { keys: ['engUnit'], values: [{ type: DataType.String, string_value: m.unit }] };
    return out;
  });
  const msg = type.fromObject({ timestamp: p.timestamp, metrics, ...(p.seq !== undefined ? { seq: p.seq } : {}) });
  return type.encode(msg).finish();
}

/** The specification's rebirth request: NCMD with the boolean metric `Node Control/Rebirth` = true. */
export function rebirthCommand(now: number): Uint8Array {
  return encodeSparkplugPayload({ timestamp: now, metrics: [{ name: 'Node Control/Rebirth', datatype: DataType.Boolean, value: true }] });
}
