/** Sparkplug B payloads for tests, encoded by the specification's field numbers with protobufjs (independent of our decoder). */
import protobuf from 'protobufjs';

// Sparkplug 3.0 Payload: timestamp = 1, metrics = 2, seq = 3. Metric: name = 1, alias = 2, timestamp = 3,
// datatype = 4, is_historical = 5, is_null = 7, properties = 9, int_value = 10, long_value = 11, float_value = 12,
// double_value = 13, boolean_value = 14, string_value = 15. PropertySet: keys = 1, values = 2;
// PropertyValue: type = 1, string_value = 8. DataType: Int32 = 3, Float = 9, Double = 10, Boolean = 11.
const spec = protobuf.Root.fromJSON({
  nested: {
    Payload: {
      edition: 'proto2', // explicit presence, as in the specification's proto2 file: a 0 is sent, not left out
      fields: { timestamp: { type: 'uint64', id: 1 }, metrics: { rule: 'repeated', type: 'Metric', id: 2 }, seq: { type: 'uint64', id: 3 } },
    },
    Metric: {
      edition: 'proto2',
      fields: {
        name: { type: 'string', id: 1 },
        alias: { type: 'uint64', id: 2 },
        timestamp: { type: 'uint64', id: 3 },
        datatype: { type: 'uint32', id: 4 },
        isHistorical: { type: 'bool', id: 5 },
        isNull: { type: 'bool', id: 7 },
        properties: { type: 'PropertySet', id: 9 },
        intValue: { type: 'uint32', id: 10 },
        longValue: { type: 'uint64', id: 11 },
        floatValue: { type: 'float', id: 12 },
        doubleValue: { type: 'double', id: 13 },
        booleanValue: { type: 'bool', id: 14 },
        stringValue: { type: 'string', id: 15 },
      },
    },
    PropertySet: {
      edition: 'proto2',
      fields: { keys: { rule: 'repeated', type: 'string', id: 1 }, values: { rule: 'repeated', type: 'PropertyValue', id: 2 } },
    },
    PropertyValue: { edition: 'proto2', fields: { type: { type: 'uint32', id: 1 }, stringValue: { type: 'string', id: 8 } } },
  },
});
export const PayloadT = spec.lookupType('Payload');
export const Int32 = 3,
  Float = 9,
  Double = 10,
  Boolean_ = 11,
  UInt64 = 8;

export type M = Record<string, unknown>;
export const encode = (p: { timestamp?: number; seq?: number; metrics: M[] }) =>
  Buffer.from(PayloadT.encode(PayloadT.fromObject({ timestamp: p.timestamp ?? Date.now(), ...p })).finish());
export const withUnit = (unit: string) => ({ properties: { keys: ['engUnit'], values: [{ type: 12, stringValue: unit }] } });
export const decode = (b: Buffer) => PayloadT.toObject(PayloadT.decode(b), { longs: Number }) as { metrics: M[] };
