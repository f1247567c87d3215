/**
 * The Sparkplug B payload schema (Sparkplug 3.0, "Payload" protobuf definition), written from the
 * published specification's field list and numbers. Only what Jacketwatch reads is declared in full;
 * data sets, templates and extensions are left out: protobuf skips fields a schema does not name.
 * Parsed once by protobufjs from this text (no file I/O, so the module stays pure).
 */
import protobuf from 'protobufjs';

export const SPARKPLUG_B_PROTO = `
syntax = "proto2";
package jw.sparkplug;

message Payload {
  message PropertyValue {
    optional uint32 type = 1;
    optional bool is_null = 2;
    oneof value {
      uint32 int_value = 3;
      uint64 long_value = 4;
      float float_value = 5;
      double double_value = 6;
      bool boolean_value = 7;
      string string_value = 8;
    }
  }
  message PropertySet {
    repeated string keys = 1;
    repeated PropertyValue values = 2;
  }
  message MetaData {
    optional bool is_multi_part = 1;
    optional string content_type = 2;
    optional uint64 size = 3;
    optional uint64 seq = 4;
    optional string file_name = 5;
    optional string file_type = 6;
    optional string md5 = 7;
    optional string description = 8;
  }
  message Metric {
    optional string name = 1;
    optional uint64 alias = 2;
    optional uint64 timestamp = 3;
    optional uint32 datatype = 4;
    optional bool is_historical = 5;
    optional bool is_transient = 6;
    optional bool is_null = 7;
    optional MetaData metadata = 8;
    optional PropertySet properties = 9;
    oneof value {
      uint32 int_value = 10;
      uint64 long_value = 11;
      float float_value = 12;
      double double_value = 13;
      bool boolean_value = 14;
      string string_value = 15;
      bytes bytes_value = 16;
    }
  }
  optional uint64 timestamp = 1;
  repeated Metric metrics = 2;
  optional uint64 seq = 3;
  optional string uuid = 4;
  optional bytes body = 5;
}
`;

/** Sparkplug 3.0 metric data types (the numbers of the specification's DataType enumeration). */
export const DataType = {
  Unknown: 0,
  Int8: 1,
  Int16: 2,
  Int32: 3,
  Int64: 4,
  UInt8: 5,
  UInt16: 6,
  UInt32: 7,
  UInt64: 8,
  Float: 9,
  Double: 10,
  Boolean: 11,
  String: 12,
  DateTime: 13,
  Text: 14,
  UUID: 15,
  DataSet: 16,
  Bytes: 17,
} as const;

let payloadType: protobuf.Type | null = null;

/** The protobufjs type of the Payload message, parsed on first use. */
export function sparkplugPayloadType(): protobuf.Type {
  if (!payloadType) payloadType = protobuf.parse(SPARKPLUG_B_PROTO, { keepCase: true }).root.lookupType('jw.sparkplug.Payload');
  return payloadType;
}
