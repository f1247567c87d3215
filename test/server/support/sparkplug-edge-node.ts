/**
 * A Sparkplug B edge node for process-level tests, behaving as Eclipse Sparkplug 3.0 has an edge node with a
 * primary host: it waits for the host's STATE online before its births; its will is an NDEATH with its bdSeq;
 * while the host's STATE says offline (the host's will, same timestamp as the online it saw) it keeps its data
 * (store and forward); on an NCMD "Node Control/Rebirth" it publishes NBIRTH and DBIRTH again (seq from 0) and
 * then sends what it kept, flagged historical. One metric `coolant_temp` on the node (alias 1) and one on its
 * device (alias 2), a value every `everyMs` on each. Every value that went onto the wire is listed in `sent`.
 * Payloads are encoded by the test's own descriptor (sparkplug-payload.ts), not by the server's code.
 */
import mqtt, { type MqttClient } from 'mqtt';
import { Boolean_, decode, Double, encode, UInt64 } from './sparkplug-payload';

export interface SentValue {
  /** 'node': the node's own metric; 'device': its device's. */
  of: 'node' | 'device';
  ts: number;
  value: number;
  /** Wall clock when it was published. */
  at: number;
  kind: 'birth' | 'data' | 'historical';
}

export interface EdgeNodeOptions {
  url: string;
  username: string;
  password: string;
  groupId: string;
  edgeNodeId: string;
  deviceId: string;
  hostId: string;
  everyMs: number;
}

export class TestEdgeNode {
  readonly sent: SentValue[] = [];
  /** Wall-clock times of the rebirth commands received, and of the births that answered them. */
  readonly rebirthsAsked: number[] = [];
  readonly rebirthsAnswered: number[] = [];
  /** Wall-clock times the host's STATE turned offline / online here. */
  readonly hostOffline: number[] = [];
  readonly hostOnline: number[] = [];
  private client!: MqttClient;
  private seq = 0;
  private lastTs = 0;
  private hostTs = -1;
  private online = false;
  private born = false;
  private kept: Array<{ of: 'node' | 'device'; ts: number; value: number }> = [];
  private timer: NodeJS.Timeout | null = null;
  private paused = false;
  private chain: Promise<unknown> = Promise.resolve();

  constructor(private readonly o: EdgeNodeOptions) {}

  private topic(type: string, device = false): string {
    return `spBv1.0/${this.o.groupId}/${type}/${this.o.edgeNodeId}${device ? `/${this.o.deviceId}` : ''}`;
  }

  private nextSeq(): number {
    const s = this.seq;
    this.seq = (this.seq + 1) % 256;
    return s;
  }

  private nextTs(): number {
    this.lastTs = Math.max(Date.now(), this.lastTs + 1);
    return this.lastTs;
  }

  private value(ts: number): number {
    return 80 + (Math.floor(ts / 1000) % 7) * 0.5;
  }

  /** Connects, waits for the host's STATE online, publishes its births, then data every `everyMs`. */
  async start(): Promise<void> {
    this.client = await mqtt.connectAsync(this.o.url, {
      username: this.o.username,
      password: this.o.password,
      clientId: `edge-${this.o.groupId}-${this.o.edgeNodeId}`,
      clean: true,
      reconnectPeriod: 0,
      will: {
        topic: this.topic('NDEATH'),
        payload: encode({ timestamp: Date.now(), metrics: [{ name: 'bdSeq', datatype: UInt64, longValue: 0 }] }),
        qos: 1,
        retain: false,
      },
    });
    this.client.on('message', (topic, payload) => {
      this.chain = this.chain.then(() => this.onMessage(topic, payload)).catch(() => undefined);
    });
    await this.client.subscribeAsync([this.topic('NCMD'), `spBv1.0/STATE/${this.o.hostId}`], { qos: 1 });
    this.timer = setInterval(() => {
      this.chain = this.chain.then(() => this.tick()).catch(() => undefined);
    }, this.o.everyMs);
  }

  private async onMessage(topic: string, payload: Buffer): Promise<void> {
    const at = Date.now();
    if (topic.startsWith('spBv1.0/STATE/')) {
      const s = JSON.parse(payload.toString()) as { online: boolean; timestamp: number };
      if (s.timestamp < this.hostTs) return; // a late will of an older host connection
      this.hostTs = s.timestamp;
      if (s.online !== this.online) (s.online ? this.hostOnline : this.hostOffline).push(at);
      this.online = s.online;
      if (this.online && !this.born) await this.births();
      return;
    }
    const rebirth = decode(payload).metrics.some((m) => m.name === 'Node Control/Rebirth' && m.booleanValue === true);
    if (!rebirth) return;
    this.rebirthsAsked.push(at);
    this.online = true; // only the primary host commands us
    this.rebirthsAnswered.push(Date.now()); // the answer starts with the births
    await this.births();
    const kept = this.kept;
    this.kept = [];
    for (const k of kept) await this.data(k.of, k.ts, k.value, true);
  }

  private async births(): Promise<void> {
    this.seq = 0;
    const ts = this.nextTs();
    const v = this.value(ts);
    await this.client.publishAsync(
      this.topic('NBIRTH'),
      encode({
        timestamp: ts,
        seq: this.nextSeq(),
        metrics: [
          { name: 'bdSeq', datatype: UInt64, longValue: 0 },
          { name: 'Node Control/Rebirth', datatype: Boolean_, booleanValue: false },
          { name: 'coolant_temp', alias: 1, datatype: Double, doubleValue: v, timestamp: ts },
        ],
      }),
    );
    this.sent.push({ of: 'node', ts, value: v, at: Date.now(), kind: 'birth' });
    await this.client.publishAsync(
      this.topic('DBIRTH', true),
      encode({ timestamp: ts, seq: this.nextSeq(), metrics: [{ name: 'coolant_temp', alias: 2, datatype: Double, doubleValue: v, timestamp: ts }] }),
    );
    this.sent.push({ of: 'device', ts, value: v, at: Date.now(), kind: 'birth' });
    this.born = true;
  }

  private async data(of: 'node' | 'device', ts: number, value: number, historical: boolean): Promise<void> {
    const metric = { alias: of === 'node' ? 1 : 2, doubleValue: value, timestamp: ts, ...(historical ? { isHistorical: true } : {}) };
    await this.client.publishAsync(
      this.topic(of === 'node' ? 'NDATA' : 'DDATA', of === 'device'),
      encode({ timestamp: ts, seq: this.nextSeq(), metrics: [metric] }),
    );
    this.sent.push({ of, ts, value, at: Date.now(), kind: historical ? 'historical' : 'data' });
  }

  private async tick(): Promise<void> {
    if (!this.born || this.paused) return;
    for (const of of ['node', 'device'] as const) {
      const ts = this.nextTs();
      const value = this.value(ts);
      if (this.online) await this.data(of, ts, value, false);
      else this.kept.push({ of, ts, value }); // the host is offline: kept for later
    }
  }

  /** Stops or resumes the data (births and commands are still answered). */
  pause(paused: boolean): Promise<void> {
    this.paused = paused;
    return this.chain.then(() => undefined);
  }

  keptCount(): number {
    return this.kept.length;
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.chain.catch(() => undefined);
    await this.client?.endAsync(true).catch(() => undefined);
  }
}
