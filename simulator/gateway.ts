/**
 * The simulated gateways: one MQTT client per engine, one timer for all engines.
 * Each tick steps every engine model and publishes the single-sample payload. While a client is
 * disconnected (or the scenario has its uplink down) samples are kept in a bounded buffer and
 * sent on reconnect as `samples` batches before live data. History (backfill) goes out the same
 * way, a few batches in flight per engine, as fast as the acknowledgements come back.
 */
import mqtt, { MqttClient } from 'mqtt';
import { telemetryTopic, statusTopic } from '../shared/topics';
import { EngineModel, Sample } from './engine-model';
import { SPARKPLUG_BATCH_SAMPLES, SparkplugEdge, type SparkplugId } from './sparkplug';

export interface DeviceRecord {
  engineId: number;
  username: string;
  secret: string;
  engineName?: string;
  siteId?: number;
  duty: 'standby' | 'prime' | 'continuous';
  capacityL: number;
  capPressureKpa: number;
  heaterSetpointC: number | null;
  coolantFamily?: string;
  /** The record's Sparkplug B identity (needed with --protocol sparkplug). */
  sparkplug?: SparkplugId;
}

export interface GatewayOptions {
  mqttUrl: string;
  qos: 0 | 1;
  rateHz: number;
  /** Largest number of samples kept per engine while offline (oldest dropped first). */
  maxBufferSamples: number;
  /** Publish retained online/offline on the status topic, with a last will. */
  status: boolean;
  /** Called once per engine when it goes live (after its backfill, or at start). */
  onLive?: (link: EngineLink, ts: number) => void;
  log?: (line: string) => void;
  /** Connection attempts started at once (the broker checks a bcrypt hash for each). */
  connectConcurrency?: number;
  /** `json` (our topics, default) or `sparkplug` (Sparkplug B births, alias-only data, NDEATH will). */
  protocol?: 'json' | 'sparkplug';
}

/** Contract limits (DEVELOPERS.md): at most 500 samples and 16 KiB per payload. */
export const MAX_BATCH_SAMPLES = 500;
export const MAX_PAYLOAD_BYTES = 16 * 1024;
/** Batches sent ahead of their acknowledgement, per engine. */
const BATCHES_IN_FLIGHT = 4;

export interface LinkStats {
  published: number; // samples handed to the client
  acked: number; // samples whose publish completed (PUBACK at QoS 1)
  messages: number;
  dropped: number; // samples lost to the bounded buffer or failed batches
  errors: number;
}

/** Array-backed FIFO with a moving head: cheap push and drop-from-front. */
class SampleQueue {
  private items: Sample[] = [];
  private head = 0;
  get length(): number {
    return this.items.length - this.head;
  }
  push(s: Sample): void {
    this.items.push(s);
  }
  at(i: number): Sample {
    return this.items[this.head + i];
  }
  drop(n: number): void {
    this.head += Math.min(n, this.length);
    if (this.head > 1024 && this.head * 2 > this.items.length) {
      this.items = this.items.slice(this.head);
      this.head = 0;
    }
  }
}

export function singlePayload(s: Sample): string {
  return JSON.stringify({ ts: s.ts, values: s.values });
}

/** Greedily take samples from the front while the payload stays within the contract's limits. */
export function buildBatch(queue: { length: number; at(i: number): Sample }): { payload: string; count: number } {
  let body = '';
  let count = 0;
  const overhead = '{"samples":[]}'.length;
  while (count < queue.length && count < MAX_BATCH_SAMPLES) {
    const part = singlePayload(queue.at(count));
    const extra = (count > 0 ? 1 : 0) + Buffer.byteLength(part);
    if (overhead + body.length + extra > MAX_PAYLOAD_BYTES) break;
    body += (count > 0 ? ',' : '') + part;
    count++;
  }
  return { payload: `{"samples":[${body}]}`, count };
}

export class EngineLink {
  readonly stats: LinkStats = { published: 0, acked: 0, messages: 0, dropped: 0, errors: 0 };
  client: MqttClient | null = null;
  live = false;
  private readonly queue = new SampleQueue();
  private flushing = false;
  private uplinkDown = false;
  private history: Iterator<Sample> | null = null;
  private lastError = '';
  private readonly sp: SparkplugEdge | null;
  private lastSample: Sample | null = null;

  constructor(
    readonly device: DeviceRecord,
    readonly model: EngineModel,
    private readonly gw: Gateway,
  ) {
    if (gw.opts.protocol === 'sparkplug' && !device.sparkplug)
      throw new Error(`engine ${device.engineId}: --protocol sparkplug needs a "sparkplug" identity in the devices file`);
    this.sp = gw.opts.protocol === 'sparkplug' ? new SparkplugEdge(device.sparkplug!) : null;
  }

  /** Sparkplug: the births (again after a reconnect or an NCMD rebirth); they go out before any data. */
  private birth(client: MqttClient): void {
    for (const b of this.sp!.births(this.lastSample)) client.publish(b.topic, b.payload, { qos: this.gw.opts.qos });
  }

  get engineId(): number {
    return this.device.engineId;
  }
  get buffered(): number {
    return this.queue.length;
  }
  get connected(): boolean {
    return !!this.client?.connected;
  }

  connect(): Promise<void> {
    const o = this.gw.opts;
    const id = this.engineId;
    const client = mqtt.connect(o.mqttUrl, {
      username: this.device.username,
      password: this.device.secret,
      clientId: `jw-sim-${id}-${Math.random().toString(16).slice(2, 8)}`,
      clean: true,
      reconnectPeriod: 1000,
      connectTimeout: 60_000,
      protocolVersion: 4, // aedes speaks MQTT 3.1.1
      will: this.sp
        ? { ...this.sp.will(), qos: 0, retain: false }
        : o.status
          ? { topic: statusTopic(id), payload: Buffer.from('offline'), qos: 1, retain: true }
          : undefined,
    });
    this.client = client;
    const sp = this.sp;
    if (sp) {
      client.on('message', (_topic, payload) => {
        if (sp.isRebirth(payload)) this.birth(client);
      });
    }
    client.on('connect', () => {
      if (sp) {
        client.subscribe(sp.commandTopic(), { qos: 0 });
        this.birth(client);
      }
      if (o.status && !sp) client.publish(statusTopic(id), 'online', { qos: 1, retain: true });
      void this.flush();
    });
    client.on('error', (err) => {
      this.stats.errors++;
      if (err.message !== this.lastError) {
        this.lastError = err.message;
        o.log?.(`engine ${id}: ${err.message}`);
      }
    });
    return new Promise((resolve) => {
      const done = (): void => {
        client.off('connect', done);
        client.off('error', done);
        client.off('close', done);
        resolve();
      };
      client.once('connect', done);
      client.once('error', done);
      client.once('close', done);
    });
  }

  /** History from `fromMs` every `stepMs`, generated lazily from the model until it catches up with now. */
  startBackfill(fromMs: number, stepMs: number, now: () => number): void {
    const model = this.model;
    this.history = (function* () {
      for (let ts = fromMs; ts <= now() - stepMs; ts += stepMs) yield model.step(ts).sample;
    })();
  }

  goLive(ts: number): void {
    if (this.live) return;
    this.live = true;
    this.gw.opts.onLive?.(this, ts);
  }

  /** One timer tick: step the model and send (or keep) the sample. */
  tick(ts: number): void {
    if (this.history) return; // the model belongs to the backfill until it has caught up
    if (!this.live) this.goLive(ts);
    const r = this.model.step(ts);
    this.lastSample = r.sample;
    this.uplinkDown = !r.publish;
    const canSend = this.connected && !this.uplinkDown;
    if (canSend && this.queue.length === 0 && !this.flushing) {
      this.send(this.sp ? this.sp.data([r.sample]) : singlePayload(r.sample), 1);
      return;
    }
    this.queue.push(r.sample);
    if (this.queue.length > this.gw.opts.maxBufferSamples) {
      this.queue.drop(1);
      this.stats.dropped++;
    }
    if (canSend) void this.flush();
  }

  private send(payload: string | Buffer, count: number): Promise<boolean> {
    const client = this.client!;
    this.stats.published += count;
    this.stats.messages++;
    return new Promise((resolve) => {
      client.publish(this.sp ? this.sp.dataTopic() : telemetryTopic(this.engineId), payload, { qos: this.gw.opts.qos }, (err) => {
        if (err) {
          this.stats.errors++;
          resolve(false);
        } else {
          this.stats.acked += count;
          resolve(true);
        }
      });
    });
  }

  /**
   * Send what is buffered (and any history) in batches, oldest first, with a few batches in flight
   * so that acknowledgement latency does not set the pace. A sample leaves the buffer only when its
   * batch is acknowledged; in-flight QoS 1 messages are replayed by the client after a reconnect.
   */
  async flush(): Promise<void> {
    if (this.flushing) return;
    this.flushing = true;
    const inflight: Promise<{ ok: boolean; count: number }>[] = [];
    let sentAhead = 0; // samples at the front of the queue already in flight
    const unsent = { length: 0, at: (i: number) => this.queue.at(sentAhead + i) };
    try {
      for (;;) {
        while (inflight.length < BATCHES_IN_FLIGHT && this.connected && !this.uplinkDown) {
          if (this.queue.length - sentAhead === 0 && this.history) this.refillFromHistory();
          unsent.length = this.queue.length - sentAhead;
          if (unsent.length === 0) break;
          const { payload, count } = this.sp ? this.sparkplugBatch(unsent) : buildBatch(unsent);
          inflight.push(this.send(payload, count).then((ok) => ({ ok, count })));
          sentAhead += count;
        }
        const oldest = inflight.shift();
        if (!oldest) break;
        const r = await oldest;
        this.queue.drop(r.count);
        sentAhead -= r.count;
        if (!r.ok) this.stats.dropped += r.count; // the client gave up on it (closing): count, do not loop
      }
    } finally {
      this.flushing = false;
    }
  }

  private sparkplugBatch(unsent: { length: number; at(i: number): Sample }): { payload: Buffer; count: number } {
    const samples: Sample[] = [];
    for (let i = 0; i < unsent.length && i < SPARKPLUG_BATCH_SAMPLES; i++) samples.push(unsent.at(i));
    return { payload: this.sp!.data(samples), count: samples.length };
  }

  private refillFromHistory(): void {
    for (let i = 0; i < MAX_BATCH_SAMPLES && this.history; i++) {
      const n = this.history.next();
      if (n.done) {
        this.history = null;
        this.goLive(Date.now());
      } else this.queue.push(n.value);
    }
  }

  /** Backfill finished and nothing left to send. */
  get idle(): boolean {
    return !this.history && this.queue.length === 0 && !this.flushing;
  }

  async close(): Promise<void> {
    const c = this.client;
    if (!c) return;
    if (this.sp && c.connected) {
      // a clean goodbye: the broker does not send the will then, so say it ourselves
      const { topic, payload } = this.sp.will();
      await new Promise<void>((r) => c.publish(topic, payload, { qos: 1 }, () => r()));
    } else if (this.gw.opts.status && c.connected) {
      await new Promise<void>((r) => c.publish(statusTopic(this.engineId), 'offline', { qos: 1, retain: true }, () => r()));
    }
    await c.endAsync(false).catch(() => undefined);
  }
}

export class Gateway {
  readonly links: EngineLink[];
  private timer: NodeJS.Timeout | null = null;
  private nextTickAt = 0;
  private readonly byId = new Map<number, EngineLink>();

  constructor(
    devices: DeviceRecord[],
    models: EngineModel[],
    readonly opts: GatewayOptions,
  ) {
    this.links = devices.map((d, i) => new EngineLink(d, models[i], this));
    for (const l of this.links) this.byId.set(l.engineId, l);
  }

  link(engineId: number): EngineLink | undefined {
    return this.byId.get(engineId);
  }

  /** Open every client, a few at a time so the broker is not swamped with password checks. */
  async connectAll(): Promise<void> {
    const concurrency = this.opts.connectConcurrency ?? 25;
    let next = 0;
    const worker = async (): Promise<void> => {
      while (next < this.links.length) await this.links[next++].connect();
    };
    await Promise.all(Array.from({ length: Math.min(concurrency, this.links.length) }, worker));
  }

  /** One timer drives all engines; it re-aims at the next slot so it does not drift. */
  startTimer(): void {
    const period = 1000 / this.opts.rateHz;
    this.nextTickAt = Date.now();
    const run = (): void => {
      const now = Date.now();
      for (const l of this.links) l.tick(now);
      this.nextTickAt += period;
      if (this.nextTickAt < now) this.nextTickAt = now + period; // fell behind: skip, do not burst
      this.timer = setTimeout(run, this.nextTickAt - Date.now());
    };
    run();
  }

  stopTimer(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
  }

  totals(): LinkStats & { buffered: number; connected: number; live: number } {
    const t = { published: 0, acked: 0, messages: 0, dropped: 0, errors: 0, buffered: 0, connected: 0, live: 0 };
    for (const l of this.links) {
      t.published += l.stats.published;
      t.acked += l.stats.acked;
      t.messages += l.stats.messages;
      t.dropped += l.stats.dropped;
      t.errors += l.stats.errors;
      t.buffered += l.buffered;
      if (l.connected) t.connected++;
      if (l.live) t.live++;
    }
    return t;
  }

  /** Wait (bounded) for in-flight and buffered samples to be acknowledged. */
  async drain(timeoutMs: number): Promise<void> {
    const until = Date.now() + timeoutMs;
    while (Date.now() < until) {
      const t = this.totals();
      if (t.acked + t.dropped >= t.published && this.links.every((l) => l.buffered === 0 || !l.connected)) return;
      await new Promise((r) => setTimeout(r, 100));
    }
  }

  async closeAll(): Promise<void> {
    this.stopTimer();
    await Promise.all(this.links.map((l) => l.close()));
  }
}
