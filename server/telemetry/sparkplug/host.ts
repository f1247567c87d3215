/**
 * The Sparkplug B host side of the embedded broker: topic confinement for Sparkplug identities, the
 * per-edge-node session (sequence numbers, birth/death, alias tables), metric names to channels, and
 * rebirth requests. Effects (ingest, counting, live state, publishing, the device lookup) are handed in,
 * so this module holds no I/O of its own.
 *
 * Session rules (Sparkplug 3.0): an NBIRTH starts a node session (seq restarts, device sessions end);
 * every later NDATA/DBIRTH/DDATA/DDEATH carries seq + 1 (mod 256); an NDEATH (the node's MQTT will) ends
 * the session if its bdSeq matches the NBIRTH's. Data naming an alias we do not know (our restart lost
 * the tables) triggers an NCMD "Node Control/Rebirth", at most once per REBIRTH_MIN_INTERVAL_MS per node.
 */
import type { ParsedReading } from '../../../shared/telemetry-payload';
import { checkMetricValue, isSparkplugControlMetric, mapMetric, type MappedMetric, type MetricMap } from '../../../shared/sparkplug/channels';
import { rebirthCommand } from '../../../shared/sparkplug/encode';
import { decodeSparkplugPayload, metricValue, type SparkplugMetric, type SparkplugPayload } from '../../../shared/sparkplug/payload';
import { parseSparkplugTopic, sparkplugTopic, type SparkplugTopic } from '../../../shared/sparkplug/topic';

export const REBIRTH_MIN_INTERVAL_MS = 5000;

export interface SparkplugIdentity {
  groupId: string;
  edgeNodeId: string;
  deviceId: string | null;
}

/** The connected MQTT client as the broker knows it (device record, engine, optional Sparkplug identity). */
export interface SparkplugClient {
  deviceId: number;
  engineId: number;
  sparkplug?: SparkplugIdentity | null;
}

/** One device record under an edge node (deviceId null: the record of the edge node itself). */
export interface NodeRecord {
  recordId: number;
  engineId: number;
  sparkplugDeviceId: string | null;
  metricMap: MetricMap | null;
}

export interface SparkplugHostDeps {
  /** Readings of one engine, into the same path as JSON readings; `done` when there is room. */
  ingest(recordId: number, engineId: number, readings: ParsedReading[], done: () => void): void;
  reject(recordId: number | null, reason: string, detail: string): void;
  /** A death certificate: the engine's live data is lost now. */
  markLost(engineId: number, at: number): void;
  /** Live (not revoked) device records of one edge node; read at each birth so mapping edits apply. */
  nodeRecords(groupId: string, edgeNodeId: string): Promise<NodeRecord[]>;
  log: { warn(msg: string, ...rest: unknown[]): void; debug(msg: string, ...rest: unknown[]): void };
  now?(): number;
}

interface AliasEntry {
  name: string;
  mapped: MappedMetric | null;
  datatype: number | null;
  unit: string | null;
}

interface DeviceSession {
  record: NodeRecord | null;
  aliases: Map<string, AliasEntry>;
  names: Map<string, AliasEntry>;
}

interface NodeSession {
  seq: number;
  bdSeq: string | null;
  node: DeviceSession;
  devices: Map<string, DeviceSession>;
}

export interface SparkplugStats {
  births: number;
  deaths: number;
  seqGaps: number;
  rebirthRequests: number;
  nodesOnline: number;
  /** External broker: node sessions ended because one of the node's device records was revoked or rotated (on any server). */
  sessionsEndedByRecord: number;
}

type Callback = (err?: Error | null) => void;

export class SparkplugHost {
  private readonly sessions = new Map<string, NodeSession>();
  private readonly lastRebirth = new Map<string, number>();
  /** Nodes with a birth in progress: their later messages wait here, in order. */
  private readonly waiting = new Map<string, Array<() => Promise<void> | void>>();
  private publish: ((topic: string, payload: Buffer) => void) | null = null;
  /** External broker: the edge nodes known here, as the client they stand for (its node record). */
  private readonly externalClients = new Map<string, SparkplugClient>();
  private readonly stats = { births: 0, deaths: 0, seqGaps: 0, rebirthRequests: 0, sessionsEndedByRecord: 0 };
  private readonly now: () => number;

  constructor(private readonly deps: SparkplugHostDeps) {
    this.now = deps.now ?? Date.now;
  }

  /** The broker's publish, for NCMD; given once the broker runs (external broker: the host connection's). */
  attach(publish: ((topic: string, payload: Buffer) => void) | null): void {
    this.publish = publish;
  }

  counters(): SparkplugStats {
    return { ...this.stats, nodesOnline: this.sessions.size };
  }

  /** Subscriptions a Sparkplug gateway may hold: the commands addressed to its own edge node. */
  maySubscribe(client: SparkplugClient, filter: string): boolean {
    const id = client.sparkplug;
    if (!id) return false;
    const node = `spBv1.0/${id.groupId}/NCMD/${id.edgeNodeId}`;
    const devices = `spBv1.0/${id.groupId}/DCMD/${id.edgeNodeId}/`;
    return filter === node || filter === devices + '#' || filter === devices + '+' || (filter.startsWith(devices) && !/[+#]/.test(filter));
  }

  /** Which Sparkplug messages the broker passes on to subscribers: only the commands. */
  forwards(topic: string): boolean {
    const t = parseSparkplugTopic(topic);
    return !!t && (t.type === 'NCMD' || t.type === 'DCMD');
  }

  /**
   * aedes authorizePublish for a topic under spBv1.0/. A topic outside the client's own identity is
   * refused (the connection closes, as for our JSON topics); a bad payload is counted and acknowledged.
   */
  authorizePublish(client: SparkplugClient, topic: string, payload: Buffer, cb: Callback): void {
    const t = parseSparkplugTopic(topic);
    const id = client.sparkplug;
    const refuse = (why: string) => {
      this.deps.reject(client.deviceId, 'wrong_topic', `topic "${topic.slice(0, 160)}": ${why}`);
      cb(new Error('topic not allowed'));
    };
    if (!id) return refuse('this device has no Sparkplug identity');
    if (!t) return refuse('not a Sparkplug node or device topic');
    if (t.groupId !== id.groupId || t.edgeNodeId !== id.edgeNodeId) return refuse(`not under spBv1.0/${id.groupId}/.../${id.edgeNodeId}`);
    if (t.type === 'NCMD' || t.type === 'DCMD') return refuse('commands come from the host, not from a gateway');
    // a record for one device under an edge node speaks for that device only
    if (t.deviceId !== null && id.deviceId !== null && t.deviceId !== id.deviceId)
      return refuse(`device "${t.deviceId}" is not this record's device "${id.deviceId}"`);

    const decoded = decodeSparkplugPayload(payload);
    if (!decoded.ok) {
      this.deps.reject(client.deviceId, decoded.reason, `${t.type}: ${decoded.detail}`);
      return cb(null);
    }
    this.serial(this.nodeKey(t), () => {
      try {
        return this.handle(client, t, decoded.payload, cb);
      } catch (err) {
        this.deps.log.warn('sparkplug: message handling failed', err);
        cb(null);
      }
    });
  }

  /**
   * A message from an external broker (MQTT_URL), which authenticated the gateway itself and enforces its
   * topics: it speaks for the edge node whose device records are here (read at each NBIRTH, and once for
   * a node not seen yet). An edge node with no record here is refused and counted; commands (ours, or
   * another host's) are passed over. `done` once the readings are committed (the PUBACK of a QoS 1 message).
   */
  fromExternal(topic: string, payload: Buffer, done: () => void): void {
    const t = parseSparkplugTopic(topic);
    if (!t || t.type === 'NCMD' || t.type === 'DCMD') return done();
    const key = this.nodeKey(t);
    this.serial(key, async () => {
      let client = this.externalClients.get(key);
      if (!client || t.type === 'NBIRTH') {
        const records = await this.deps.nodeRecords(t.groupId, t.edgeNodeId).catch((err) => {
          this.deps.log.warn('sparkplug: reading the node records failed', err);
          return null;
        });
        if (records === null) return done();
        const own = records.find((r) => r.sparkplugDeviceId === null) ?? records[0];
        client = own
          ? { deviceId: own.recordId, engineId: own.engineId, sparkplug: { groupId: t.groupId, edgeNodeId: t.edgeNodeId, deviceId: null } }
          : undefined;
        if (client) this.externalClients.set(key, client);
        else this.externalClients.delete(key);
      }
      if (!client) {
        this.deps.reject(null, 'wrong_topic', `topic "${topic.slice(0, 160)}": no device record for edge node ${t.groupId}/${t.edgeNodeId}`);
        return done();
      }
      const decoded = decodeSparkplugPayload(payload);
      if (!decoded.ok) {
        this.deps.reject(client.deviceId, decoded.reason, `${t.type}: ${decoded.detail}`);
        return done();
      }
      await new Promise<void>((resolve) => {
        try {
          const pending = this.handle(client, t, decoded.payload, () => resolve());
          if (pending) pending.catch(() => resolve());
        } catch (err) {
          this.deps.log.warn('sparkplug: message handling failed', err);
          resolve();
        }
      });
      done();
    });
  }

  /**
   * External broker: a device record changed (revoked, say). The broker still lets its gateway in, so the
   * edge node's session here ends: its next data asks for a rebirth, and the birth reads the records again
   * (a revoked record is no longer among them, and nothing more is stored for it).
   */
  forgetExternalRecord(recordId: number): void {
    for (const [key, client] of this.externalClients) {
      const s = this.sessions.get(key);
      const involved =
        client.deviceId === recordId || s?.node.record?.recordId === recordId || [...(s?.devices.values() ?? [])].some((d) => d.record?.recordId === recordId);
      if (!involved) continue;
      this.externalClients.delete(key);
      this.sessions.delete(key);
      this.stats.sessionsEndedByRecord++;
    }
  }

  /**
   * External broker: this server took or gave up the host role. Every node session known here ends (another
   * server may have seen births and deaths meanwhile): the nodes are asked to rebirth (rebirthAll) when the
   * role is taken, and their data until then asks again.
   */
  forgetAll(): void {
    this.externalClients.clear();
    this.sessions.clear();
    this.lastRebirth.clear();
  }

  /** Asks every given edge node for its births (the nodes registered here, when the host role is taken). */
  rebirthAll(nodes: Array<{ groupId: string; edgeNodeId: string }>): void {
    for (const n of nodes) if (!this.sessions.has(this.nodeKey(n))) this.requestRebirth(n);
  }

  /**
   * One node's messages are handled in arrival order: a birth reads the device records (async), and
   * aedes may hand us the DBIRTH and DDATA behind it before that read is back.
   */
  private serial(key: string, job: () => Promise<void> | void): void {
    const queue = this.waiting.get(key);
    if (queue) {
      queue.push(job);
      return;
    }
    const run = (j: () => Promise<void> | void): void => {
      const pending = j();
      if (pending) {
        this.waiting.set(key, this.waiting.get(key) ?? []);
        pending.then(next, next);
      } else next();
    };
    const next = (): void => {
      const q = this.waiting.get(key);
      const j = q?.shift();
      if (j) run(j);
      else this.waiting.delete(key);
    };
    run(job);
  }

  private nodeKey(t: { groupId: string; edgeNodeId: string }): string {
    return t.groupId + '/' + t.edgeNodeId;
  }

  private handle(client: SparkplugClient, t: SparkplugTopic, p: SparkplugPayload, cb: Callback): Promise<void> | void {
    const key = this.nodeKey(t);
    switch (t.type) {
      case 'NBIRTH':
        return this.nodeBirth(client, t, key, p, cb);
      case 'NDEATH':
        return this.nodeDeath(client, t, key, p, cb);
      case 'DBIRTH':
        return this.deviceBirth(client, t, key, p, cb);
      case 'DDEATH': {
        const s = this.sessions.get(key);
        if (s) this.checkSeq(client, s, t, p);
        const dev = s?.devices.get(t.deviceId!);
        if (dev?.record) {
          this.stats.deaths++;
          this.deps.markLost(dev.record.engineId, this.now());
        }
        s?.devices.delete(t.deviceId!);
        return cb(null);
      }
      case 'NDATA':
      case 'DDATA':
        return this.data(client, t, key, p, cb);
      default:
        return cb(null);
    }
  }

  private nodeBirth(client: SparkplugClient, t: SparkplugTopic, key: string, p: SparkplugPayload, cb: Callback): Promise<void> {
    // births are rare: read the records now, so new devices and mapping edits take effect here
    return this.deps.nodeRecords(t.groupId, t.edgeNodeId).then(
      (records) => {
        const nodeRecord = records.find((r) => r.sparkplugDeviceId === null) ?? null;
        const session: NodeSession = {
          seq: p.seq ?? 0,
          bdSeq: p.metrics.find((m) => m.name === 'bdSeq')?.raw.value?.toString() ?? null,
          node: emptyDevice(nodeRecord),
          devices: new Map(),
        };
        // a new node session ends the devices' sessions: their engines are lost until their DBIRTH
        const old = this.sessions.get(key);
        if (old) for (const d of old.devices.values()) if (d.record) this.deps.markLost(d.record.engineId, this.now());
        this.sessions.set(key, session);
        this.stats.births++;
        this.learn(session.node, p, t);
        this.store(client, session.node, p, t, cb);
      },
      (err) => {
        this.deps.log.warn('sparkplug: reading the node records failed', err);
        cb(null);
      },
    );
  }

  private deviceBirth(client: SparkplugClient, t: SparkplugTopic, key: string, p: SparkplugPayload, cb: Callback): Promise<void> | void {
    const s = this.sessions.get(key);
    if (!s) {
      this.deps.reject(client.deviceId, 'sparkplug_not_born', `DBIRTH for "${t.deviceId}" before the node's NBIRTH`);
      this.requestRebirth(t);
      return cb(null);
    }
    this.checkSeq(client, s, t, p);
    return this.deps.nodeRecords(t.groupId, t.edgeNodeId).then(
      (records) => {
        const record = records.find((r) => r.sparkplugDeviceId === t.deviceId) ?? null;
        if (!record) {
          // an edge node may speak for the devices registered under it, no others
          this.deps.reject(client.deviceId, 'wrong_topic', `DBIRTH for "${t.deviceId}": no device record under ${t.groupId}/${t.edgeNodeId}`);
          return cb(null);
        }
        const dev = emptyDevice(record);
        s.devices.set(t.deviceId!, dev);
        this.stats.births++;
        this.learn(dev, p, t);
        this.store(client, dev, p, t, cb);
      },
      (err) => {
        this.deps.log.warn('sparkplug: reading the node records failed', err);
        cb(null);
      },
    );
  }

  private nodeDeath(client: SparkplugClient, t: SparkplugTopic, key: string, p: SparkplugPayload, cb: Callback): void {
    const s = this.sessions.get(key);
    if (!s) return cb(null);
    const bdSeq = p.metrics.find((m) => m.name === 'bdSeq')?.raw.value?.toString() ?? null;
    // the will of an older connection arriving after a new NBIRTH must not end the new session
    if (s.bdSeq !== null && bdSeq !== null && bdSeq !== s.bdSeq) {
      this.deps.reject(client.deviceId, 'sparkplug_stale_death', `NDEATH bdSeq ${bdSeq} does not match the NBIRTH's ${s.bdSeq}`);
      return cb(null);
    }
    const at = this.now();
    this.stats.deaths++;
    if (s.node.record) this.deps.markLost(s.node.record.engineId, at);
    for (const d of s.devices.values()) if (d.record) this.deps.markLost(d.record.engineId, at);
    this.sessions.delete(key);
    cb(null);
  }

  private data(client: SparkplugClient, t: SparkplugTopic, key: string, p: SparkplugPayload, cb: Callback): void {
    const s = this.sessions.get(key);
    const dev = t.deviceId === null ? s?.node : s?.devices.get(t.deviceId);
    if (!s || !dev) {
      // typically our own restart: the gateway's births happened before we were listening
      this.deps.reject(
        client.deviceId,
        'sparkplug_unknown_alias',
        `${t.type} before its ${t.deviceId === null ? 'NBIRTH' : 'DBIRTH'}: ${p.metrics.length} metrics not understood`,
      );
      this.requestRebirth(t);
      return cb(null);
    }
    this.checkSeq(client, s, t, p);
    this.store(client, dev, p, t, cb);
  }

  /** Sequence check: every message after NBIRTH carries the previous seq + 1, wrapping at 256. */
  private checkSeq(client: SparkplugClient, s: NodeSession, t: SparkplugTopic, p: SparkplugPayload): void {
    if (p.seq === null) return;
    const expected = (s.seq + 1) % 256;
    if (p.seq !== expected) {
      this.stats.seqGaps++;
      this.deps.reject(client.deviceId, 'sparkplug_seq_gap', `${t.type}: seq ${p.seq}, expected ${expected}`);
    }
    s.seq = p.seq % 256;
  }

  /** A birth's metrics define the names, aliases, data types and units for the session. */
  private learn(dev: DeviceSession, p: SparkplugPayload, t: SparkplugTopic): void {
    const unmapped: string[] = [];
    for (const m of p.metrics) {
      if (m.name === null) continue;
      const mapped = mapMetric(m.name, dev.record?.metricMap ?? null);
      const entry: AliasEntry = { name: m.name, mapped, datatype: m.datatype, unit: m.unit };
      dev.names.set(m.name, entry);
      if (m.alias !== null) dev.aliases.set(m.alias, entry);
      if (!mapped && dev.record && !isSparkplugControlMetric(m.name)) unmapped.push(m.name);
    }
    // once per birth (rare), so the admin sees which names want a mapping entry
    if (unmapped.length && dev.record) {
      this.deps.reject(
        dev.record.recordId,
        'unknown_channel',
        `${t.type}: no channel for ${unmapped
          .slice(0, 5)
          .map((n) => `"${n.slice(0, 60)}"`)
          .join(', ')}${unmapped.length > 5 ? ` and ${unmapped.length - 5} more` : ''}`,
      );
    }
  }

  /** The metrics of one message as readings of the session's engine. */
  private store(client: SparkplugClient, dev: DeviceSession, p: SparkplugPayload, t: SparkplugTopic, cb: Callback): void {
    const now = this.now();
    const readings: ParsedReading[] = [];
    const record = dev.record;
    let unknownAlias = false;
    for (const m of p.metrics) {
      const entry = this.resolve(dev, m);
      if (!entry) {
        unknownAlias = true;
        this.deps.reject(
          client.deviceId,
          'sparkplug_unknown_alias',
          `${t.type}: alias ${m.alias ?? '(none)'}${m.name ? ` name "${m.name.slice(0, 60)}"` : ''} not in the birth certificate`,
        );
        continue;
      }
      if (!entry.mapped || !record || m.isNull) continue;
      const v = metricValue(m.raw, m.datatype ?? entry.datatype);
      if (v.kind === 'null') continue;
      if (v.kind !== 'number') {
        this.deps.reject(
          record.recordId,
          'sparkplug_type',
          `${t.type}: "${entry.name.slice(0, 60)}" is ${v.kind === 'boolean' ? 'a boolean' : v.what}, ${entry.mapped.channel} needs a number`,
        );
        continue;
      }
      const unit = m.unit ?? entry.unit ?? entry.mapped.unit;
      const checked = checkMetricValue(entry.mapped.channel, v.value, unit, m.ts ?? p.ts ?? now, now);
      if (checked.ok) readings.push(checked.reading);
      else this.deps.reject(record.recordId, checked.reason, `${t.type} "${entry.name.slice(0, 60)}": ${checked.detail}`);
    }
    if (unknownAlias) this.requestRebirth(t);
    if (!record || !readings.length) return cb(null);
    this.deps.ingest(record.recordId, record.engineId, readings, () => cb(null));
  }

  private resolve(dev: DeviceSession, m: SparkplugMetric): AliasEntry | null {
    if (m.alias !== null) {
      const byAlias = dev.aliases.get(m.alias);
      if (byAlias) return byAlias;
    }
    return m.name !== null ? (dev.names.get(m.name) ?? null) : null;
  }

  /** Asks an edge node to send its births again (NCMD Node Control/Rebirth), at most once per REBIRTH_MIN_INTERVAL_MS per node. */
  requestRebirth(t: { groupId: string; edgeNodeId: string }): void {
    const key = this.nodeKey(t);
    const now = this.now();
    const last = this.lastRebirth.get(key);
    if (last !== undefined && now - last < REBIRTH_MIN_INTERVAL_MS) return;
    if (!this.publish) return;
    this.lastRebirth.set(key, now);
    this.stats.rebirthRequests++;
    this.deps.log.debug(`sparkplug: rebirth requested from ${key}`);
    this.publish(sparkplugTopic(t.groupId, 'NCMD', t.edgeNodeId), Buffer.from(rebirthCommand(now)));
  }
}

function emptyDevice(record: NodeRecord | null): DeviceSession {
  return { record, aliases: new Map(), names: new Map() };
}
