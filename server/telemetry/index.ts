/**
 * The telemetry path: MQTT (embedded aedes, or an external broker) -> payload check ->
 * bounded buffer -> batched SQLite writes, with live state, live push and counters beside it.
 */
import fs from 'node:fs';
import { compareOffThread as checkSecret } from '../auth/hash-workers';
import { QueryTypes } from 'sequelize';
import { FailureThrottle } from '../auth/failure-throttle';
import { hashGate } from '../auth/hash-gate';
import { CHANNELS } from '../../shared/channels';
import { parseTelemetry, type ParsedReading } from '../../shared/telemetry-payload';
import { ReadingRelay } from '../cluster/reading-relay';
import { LivePush } from '../realtime/live-push';
import type { LiveReadings } from '../../shared/api/live-view';
import { Counters } from './counters';
import { DeviceActivity } from './device-activity';
import { IngestBuffer } from './ingest-buffer';
import { ListenerQueue } from './listener-queue';
import { MemoryLiveState } from './live-state';
import { ReadingWriter, type WriterOptions } from './reading-writer';
import { DEVICE_BY_USERNAME_SQL } from './sql';
import { sqliteFileOf } from '../data-files';
import { startExternalSubscriber } from './external-broker';
import { SparkplugHost, type SparkplugIdentity } from './sparkplug/host';
import { openHostConnection, type HostConnection } from './sparkplug/host-connection';
import { readNodeRecords, readSparkplugNodes } from './sparkplug/records';
import type { AcceptedReading, BrokerState, SparkplugHostState, Telemetry, TelemetryDeps } from './types';

/** Between servers (socket.io serverSideEmit): a device record was revoked or rotated on another server. */
const DEVICE_CHANGED_EVENT = 'jw:device-changed';

export interface TelemetryOptions {
  highWater?: number;
  writer?: WriterOptions;
}

interface Closable {
  close(): Promise<void>;
}

export async function startTelemetry(
  deps: TelemetryDeps,
  options: TelemetryOptions = {},
): Promise<
  Telemetry & {
    /** Per-device reject counts since start (also persisted in device_rejections). */
    rejectsByDevice(): Record<number, Record<string, number>>;
    mqttPort: number | null;
  }
> {
  const { config, sequelize, log } = deps;
  const counters = new Counters();
  const buffer = new IngestBuffer(options.highWater ?? 20_000);
  const liveState = new MemoryLiveState();
  const activity = new DeviceActivity(sequelize, log);
  const writer = new ReadingWriter(sequelize, buffer, counters, log, { sqliteFile: sqliteFileOf(config.databaseUrl), ...options.writer });
  /** onReadings listeners (rules, histories): after the live push, in their own time slices (listener-queue.ts). */
  const listeners: Array<(readings: AcceptedReading[]) => void> = [];
  const later = new ListenerQueue(listeners, log);
  const lostListeners: Array<(engineId: number, at: number) => void> = [];
  let stopping = false;

  await liveState.load(sequelize);
  const livePush = new LivePush({
    httpServer: deps.httpServer,
    verifyToken: deps.verifyToken,
    siteOfEngine: deps.siteOfEngine,
    siteScope: deps.siteScope,
    sessionValid: deps.sessionValid,
    log,
    trustForwardedHost: !!deps.config.trustProxy,
    adapter: deps.adapter,
  });
  // several servers: readings another server accepted come here too (live state, live push, rules), not to the writer
  const relay = deps.adapter
    ? new ReadingRelay(livePush.io, log, (batch) => {
        if (stopping) return;
        liveState.applyAll(batch, Date.now());
        pushLive(batch);
        later.push(batch);
      })
    : null;
  deps.access?.onUserChanged((userId) => livePush.endSessions(userId));
  deps.access?.onSitesChanged((userId) => void livePush.rescope(userId));
  const pushLive = (batch: AcceptedReading[]) => {
    try {
      livePush.push(batch);
    } catch (err) {
      log.error('telemetry: live push failed', err);
    }
  };

  const reject = (deviceId: number | null, reason: string, detail: string) => {
    counters.reject(reason);
    activity.reject(deviceId, reason, detail);
  };

  /**
   * Hot path: parse, count, buffer, notify. No await, no DB. `done` is the MQTT ack: it runs once every
   * reading of the message is committed (and there is room in the buffer); a message with no accepted
   * reading is acked at once. `readMore` (external broker only, whose client handles one message at a
   * time) lets the next message in as soon as there is room, before this one is committed. `payload` is a JSON
   * message, or readings a Sparkplug B message has already been decoded into.
   */
  const ingestNow = (deviceId: number | null, engineId: number, payload: Buffer | ParsedReading[], done: () => void, readMore?: () => void) => {
    if (stopping) return; // no ack: a QoS 1 device sends it again after the restart
    let buffered = false;
    try {
      const now = Date.now();
      counters.messages++;
      activity.seenDevice(deviceId);
      const result = Buffer.isBuffer(payload) ? parseTelemetry(engineId, payload, now) : { accepted: payload, rejects: [] };
      for (const r of result.rejects) reject(deviceId, r.reason, r.detail);
      if (result.accepted.length) {
        const batch: AcceptedReading[] = new Array(result.accepted.length);
        for (let i = 0; i < result.accepted.length; i++) {
          const a = result.accepted[i];
          if (a.outOfRange) {
            counters.outOfRange++;
            activity.reject(
              deviceId,
              'out_of_range',
              `${a.channel} = ${a.value} outside ${CHANNELS[a.channel].physicalMin}..${CHANNELS[a.channel].physicalMax}`,
            );
          }
          buffer.push(engineId, CHANNELS[a.channel].code, a.ts, a.value, a.quality);
          batch[i] = { engineId, channel: a.channel, ts: a.ts, value: a.value, quality: a.quality };
        }
        counters.received += batch.length;
        buffered = true;
        liveState.applyAll(batch, now);
        pushLive(batch); // to the browsers first: the rest of the listeners wait for their slices
        later.push(batch);
        relay?.send(batch);
      }
    } catch (err) {
      log.error('telemetry: ingest failed on a message', err);
    }
    if (readMore) buffer.whenRoom(readMore);
    if (buffered) {
      buffer.afterCommit(() => buffer.whenRoom(done));
      writer.nudge();
    } else {
      buffer.whenRoom(done);
    }
  };

  /**
   * Fair share of the event loop: one poll phase can hand us the chunks of a hundred sockets at once
   * (a flood: seconds of parsing and rule evaluation in one go, freezing HTTP, socket.io and the writer's
   * timers). At most TURN_BUDGET_MS of ingest work runs per loop turn; later messages wait in a FIFO for
   * the next turn (setImmediate). Their MQTT callbacks wait too, so aedes stops reading those sockets:
   * the queue holds at most what aedes has already read, and TCP pushes back on the devices. While the
   * listeners' own queue is full (listener-queue.ts), no message is taken, so that queue stays bounded too.
   */
  const TURN_BUDGET_MS = 15;
  type Job = [number | null, number, Buffer | ParsedReading[], () => void, (() => void) | undefined];
  let queue: Job[] = [];
  let head = 0;
  let spent = 0;
  let turnScheduled = false;
  const nextTurn = () => {
    if (turnScheduled) return;
    turnScheduled = true;
    setImmediate(() => {
      turnScheduled = false;
      const started = performance.now();
      while (head < queue.length && !later.full && performance.now() - started < TURN_BUDGET_MS) {
        const job = queue[head];
        queue[head++] = undefined as unknown as Job;
        ingestNow(job[0], job[1], job[2], job[3], job[4]);
      }
      spent = 0; // the next poll phase is a new turn
      if (head >= queue.length) {
        queue = [];
        head = 0;
      } else nextTurn();
    });
  };
  const ingest = (deviceId: number | null, engineId: number, payload: Buffer | ParsedReading[], done: () => void, readMore?: () => void) => {
    if (head < queue.length || spent >= TURN_BUDGET_MS || later.full) {
      queue.push([deviceId, engineId, payload, done, readMore]);
    } else {
      const started = performance.now();
      ingestNow(deviceId, engineId, payload, done, readMore);
      spent += performance.now() - started;
    }
    nextTurn();
  };

  /** A Sparkplug death certificate: the engine's data is lost now, not after the no-data delay. */
  const markLost = (engineId: number, at: number) => {
    // after the readings accepted before it, as the rule engine had them
    later.then(() => {
      for (const l of lostListeners) {
        try {
          l(engineId, at);
        } catch (err) {
          log.error('telemetry: lost listener failed', err);
        }
      }
    });
    const values = liveState.markLost(engineId, at);
    if (!values) return;
    const send = (siteId: number | null) => {
      const msg: LiveReadings = { engineId, siteId, ts: at, values, lost: true };
      livePush.emit(['fleet', `engine:${engineId}`, ...(siteId !== null ? [`site:${siteId}`] : [])], 'readings', msg);
    };
    deps.siteOfEngine(engineId).then(send, () => send(null));
  };
  const sparkplug = new SparkplugHost({
    ingest: (recordId, engineId, readings, done) => ingest(recordId, engineId, readings, done),
    reject: (recordId, reason, detail) => reject(recordId, reason, detail),
    markLost,
    nodeRecords: (groupId, edgeNodeId) => readNodeRecords(sequelize, groupId, edgeNodeId),
    log,
  });

  writer.start();
  activity.start();
  counters.watchEventLoop();

  const deviceLogin = new DeviceLogin(sequelize, (deviceId, detail) => activity.reject(deviceId, 'login_failed', detail));

  let mqtt: Closable;
  let mqttPort: number | null = null;
  let brokerState: () => BrokerState | null = () => null;
  let hostState: () => SparkplugHostState | null = () => null;
  let stopHost: () => Promise<void> = async () => undefined;
  if (config.mqttUrl) {
    const ext = await startExternalSubscriber({
      url: config.mqttUrl,
      clientId: config.mqttClientId,
      sharedGroup: config.mqttSharedGroup,
      log,
      ingest,
    });
    // Sparkplug B: one Primary Host Application (a node's births and data must reach one host in order): with
    // several servers the one holding the host role (deps.hostRole); alone, this server (not with a shared
    // group and no cluster: the servers could not agree who is the host)
    const mqttUrl = config.mqttUrl;
    let host: HostConnection | null = null;
    let holder = false;
    let roleChange: Promise<void> = Promise.resolve();
    const setHolder = (want: boolean): Promise<void> =>
      (roleChange = roleChange
        .catch((err: unknown) => log.warn('sparkplug host: changing the role failed', err))
        .then(async () => {
          if (want === holder || (want && stopping)) return;
          holder = want;
          sparkplug.forgetAll(); // sessions seen before are not to be trusted: another server may have had the role
          if (want) {
            // at most 10 s: a broker that refuses our account must not hold up the start (the connection retries anyway)
            if (deps.sparkplugHostReady) {
              let timer: NodeJS.Timeout | undefined;
              const late = new Promise<void>((_, reject) => {
                timer = setTimeout(() => reject(new Error('no answer from the broker within 10 s')), 10_000);
              });
              await Promise.race([deps.sparkplugHostReady(), late])
                .catch((err: unknown) => log.warn(`sparkplug host: broker rights not confirmed (${err instanceof Error ? err.message : String(err)})`))
                .finally(() => clearTimeout(timer));
            }
            if (stopping) {
              holder = false;
              return;
            }
            const conn = openHostConnection({
              url: mqttUrl,
              hostId: config.sparkplugHostId,
              log,
              onMessage: (topic, payload, done) => {
                if (host === conn) sparkplug.fromExternal(topic, payload, done);
                else done();
              },
              // the nodes we have no session for are asked for their births, so their aliases are known here
              onOnline: () =>
                void readSparkplugNodes(sequelize).then(
                  (nodes) => host === conn && sparkplug.rebirthAll(nodes),
                  (err: unknown) => log.warn('sparkplug host: reading the registered nodes failed', err),
                ),
            });
            host = conn;
            sparkplug.attach((topic, payload) => conn.publish(topic, payload));
          } else {
            const conn = host;
            host = null;
            sparkplug.attach(null);
            await conn?.close();
          }
        }));
    if (deps.hostRole) deps.hostRole.onChange(setHolder);
    else if (config.mqttSharedGroup) log.warn('sparkplug: not taken through the external broker (MQTT_SHARED_GROUP without CLUSTER on PostgreSQL)');
    else void setHolder(true); // not awaited: the start does not wait for the broker
    hostState = () => ({ hostId: config.sparkplugHostId, holder, online: host?.online() ?? false });
    stopHost = () => setHolder(false);
    deps.access?.onDeviceChanged((deviceId) => sparkplug.forgetExternalRecord(deviceId));
    // several servers: a revoke made on another server ends the node's session here too (the host may be here)
    if (relay) {
      livePush.io.on(DEVICE_CHANGED_EVENT, (deviceId: unknown) => typeof deviceId === 'number' && sparkplug.forgetExternalRecord(deviceId));
      deps.access?.onDeviceChanged((deviceId) => livePush.io.serverSideEmit(DEVICE_CHANGED_EVENT, deviceId));
    }
    brokerState = ext.state;
    mqtt = ext;
  } else {
    // required lazily so jest (which cannot load aedes) can still import this module's types
    // eslint-disable-next-line @typescript-eslint/no-require-imports
    const { createBroker } = require('../../broker/broker') as typeof import('../../broker/broker');
    const broker = await createBroker({
      port: config.mqttPort,
      host: config.mqttHost,
      tls: config.mqttTls
        ? { cert: fs.readFileSync(config.mqttTls.certFile), key: fs.readFileSync(config.mqttTls.keyFile), port: config.mqttTls.port }
        : undefined,
      log,
      authenticate: (username, password, address) => deviceLogin.check(username, password, address),
      onTelemetry: (device, engineId, payload, done) => ingest(device.deviceId, engineId, payload, done),
      onReject: (device, reason, detail) => reject(device?.deviceId ?? null, reason, detail),
      onOversizePacket: () => {
        counters.oversizePacketsClosed++;
      },
      sparkplug,
    });
    mqttPort = broker.port;
    mqtt = broker;
    deps.access?.onDeviceChanged((deviceId) => {
      const closed = broker.dropDevice(deviceId);
      if (closed) log.info(`broker: closed ${closed} connection(s) of device ${deviceId} (revoked or rotated)`);
    });
  }

  return {
    liveState,
    mqttPort,
    counters: () => ({ ...counters.snapshot(buffer.size), sparkplug: sparkplug.counters() }),
    rejectsByDevice: () => activity.rejectsByDevice(),
    brokerState: () => brokerState(),
    sparkplugHostState: () => hostState(),
    relayCounters: () => (relay ? { ...relay.counters } : null),
    onReadings: (listener) => {
      listeners.push(listener);
    },
    onLost: (listener) => {
      lostListeners.push(listener);
    },
    requestRebirth: (groupId, edgeNodeId) => sparkplug.requestRebirth({ groupId, edgeNodeId }),
    emit: (room, event, payload) => livePush.emit(room, event, payload),
    async stop() {
      if (stopping) return;
      stopping = true;
      later.drainNow(); // the rules and histories have every accepted reading
      await writer.stop(); // the final flush commits and acks what it wrote
      buffer.releaseAll(); // acks held only for room may go out now
      await new Promise((r) => setTimeout(r, 50));
      await stopHost(); // STATE offline, then the host connection ends
      await mqtt.close().catch((err) => log.warn('telemetry: closing MQTT failed', err));
      await activity.stop();
      relay?.close();
      await livePush.close();
      counters.stopWatching();
    },
  };
}

/**
 * MQTT device logins: failures counted per device (reason `login_failed`, shown to the admin in
 * GET /api/admin/ingest), throttled per client address and per username before any hashing, and
 * the bcrypt work shared fairly with HTTP sign-ins through the hash gate.
 */
class DeviceLogin {
  /** Per address: a plant's gateways may share one NAT address, so this is generous. */
  private readonly byAddress = new FailureThrottle(30, 5 * 60_000);
  private readonly byUsername = new FailureThrottle(10, 5 * 60_000);

  constructor(
    private readonly sequelize: import('sequelize').Sequelize,
    private readonly onFailure: (deviceId: number, detail: string) => void,
  ) {}

  private blocked(username: string, address: string): boolean {
    return this.byAddress.blocked(address) || this.byUsername.blocked(username);
  }

  async check(
    username: string,
    password: string,
    address: string,
  ): Promise<{ deviceId: number; engineId: number; sparkplug: SparkplugIdentity | null } | null | 'busy'> {
    if (this.blocked(username, address)) return null;
    const rows = await this.sequelize.query<{
      id: number;
      engineId: number;
      secretHash: string;
      revokedAt: unknown;
      spGroup: string | null;
      spNode: string | null;
      spDevice: string | null;
    }>(DEVICE_BY_USERNAME_SQL, { bind: [username], type: QueryTypes.SELECT, logging: false });
    const row = rows[0];
    let ok = false;
    // an unknown or revoked device needs no hashing to be refused (device usernames are not secrets)
    if (row && !row.revokedAt) {
      try {
        ok = await hashGate.run(
          address,
          async () => {
            // checked again once it is our turn: a flood queued before the limit hit is refused without hashing
            if (this.blocked(username, address)) return false;
            return checkSecret(password, row.secretHash);
          },
          username,
        );
      } catch {
        // this device already has several logins waiting from this address: not a wrong secret
        this.onFailure(Number(row.id), `too many logins of this device waiting from ${address}; answered "server unavailable"`);
        return 'busy';
      }
    }
    if (ok) {
      const sparkplug = row.spGroup && row.spNode ? { groupId: row.spGroup, edgeNodeId: row.spNode, deviceId: row.spDevice ?? null } : null;
      return { deviceId: Number(row.id), engineId: Number(row.engineId), sparkplug };
    }
    this.byAddress.fail(address);
    this.byUsername.fail(username);
    if (row) this.onFailure(Number(row.id), row.revokedAt ? `revoked device tried to connect from ${address}` : `wrong secret from ${address}`);
    return null;
  }
}
