/**
 * The simulator's Sparkplug B edge node: one session per simulated engine (its device record's
 * Sparkplug identity). NBIRTH (+ DBIRTH when the record names a device) announce every channel by
 * its key with an alias and its unit; data messages then carry only the aliases; seq runs 0-255.
 */
import { CHANNEL_KEYS, CHANNELS } from '../shared/channels';
import { DataType } from '../shared/sparkplug/schema';
import { encodeSparkplugPayload, type OutMetric } from '../shared/sparkplug/encode';
import { decodeSparkplugPayload } from '../shared/sparkplug/payload';
import { sparkplugTopic } from '../shared/sparkplug/topic';
import type { Sample } from './engine-model';

export interface SparkplugId {
  groupId: string;
  edgeNodeId: string;
  deviceId?: string | null;
}

/** Births and data stay well inside the server's 64 KiB limit: 5 metrics x this many samples. */
export const SPARKPLUG_BATCH_SAMPLES = 200;

const aliasOf = (i: number) => i + 1;

export class SparkplugEdge {
  private seq = 0;
  /** Pairs the NBIRTH with the will (NDEATH) of this MQTT connection. */
  private readonly bdSeq = 0;

  constructor(readonly id: SparkplugId) {}

  private get device(): string | null {
    return this.id.deviceId ?? null;
  }

  private nextSeq(): number {
    this.seq = (this.seq + 1) % 256;
    return this.seq;
  }

  /** The MQTT will: the broker publishes it when the connection drops. */
  will(): { topic: string; payload: Buffer } {
    return {
      topic: sparkplugTopic(this.id.groupId, 'NDEATH', this.id.edgeNodeId),
      payload: Buffer.from(encodeSparkplugPayload({ timestamp: Date.now(), metrics: [this.bdSeqMetric()] })),
    };
  }

  commandTopic(): string {
    return sparkplugTopic(this.id.groupId, 'NCMD', this.id.edgeNodeId);
  }

  /** True for an NCMD asking for a rebirth. */
  isRebirth(payload: Buffer): boolean {
    const d = decodeSparkplugPayload(payload);
    return d.ok && d.payload.metrics.some((m) => m.name === 'Node Control/Rebirth' && m.raw.field === 'boolean_value' && m.raw.value === true);
  }

  /** NBIRTH (seq 0) and, for a device, DBIRTH; `last` gives the current values. */
  births(last: Sample | null): Array<{ topic: string; payload: Buffer }> {
    this.seq = 0;
    const channels: OutMetric[] = CHANNEL_KEYS.map((key, i) => ({
      name: key,
      alias: aliasOf(i),
      datatype: DataType.Double,
      value: last?.values[key],
      unit: CHANNELS[key].unit,
    }));
    const control: OutMetric[] = [this.bdSeqMetric(), { name: 'Node Control/Rebirth', datatype: DataType.Boolean, value: false }];
    const ts = last?.ts ?? Date.now();
    const { groupId, edgeNodeId } = this.id;
    if (!this.device) {
      return [
        {
          topic: sparkplugTopic(groupId, 'NBIRTH', edgeNodeId),
          payload: Buffer.from(encodeSparkplugPayload({ timestamp: ts, seq: 0, metrics: [...control, ...channels] })),
        },
      ];
    }
    return [
      { topic: sparkplugTopic(groupId, 'NBIRTH', edgeNodeId), payload: Buffer.from(encodeSparkplugPayload({ timestamp: ts, seq: 0, metrics: control })) },
      {
        topic: sparkplugTopic(groupId, 'DBIRTH', edgeNodeId, this.device),
        payload: Buffer.from(encodeSparkplugPayload({ timestamp: ts, seq: this.nextSeq(), metrics: channels })),
      },
    ];
  }

  dataTopic(): string {
    return this.device
      ? sparkplugTopic(this.id.groupId, 'DDATA', this.id.edgeNodeId, this.device)
      : sparkplugTopic(this.id.groupId, 'NDATA', this.id.edgeNodeId);
  }

  /** One data message: every sample's values by alias only, each metric with its own timestamp. */
  data(samples: Sample[]): Buffer {
    const metrics: OutMetric[] = [];
    for (const s of samples) CHANNEL_KEYS.forEach((key, i) => metrics.push({ alias: aliasOf(i), timestamp: s.ts, value: s.values[key] }));
    return Buffer.from(encodeSparkplugPayload({ timestamp: samples[samples.length - 1].ts, seq: this.nextSeq(), metrics }));
  }

  private bdSeqMetric(): OutMetric {
    return { name: 'bdSeq', datatype: DataType.UInt64, value: this.bdSeq };
  }
}
