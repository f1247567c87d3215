/**
 * The embedded MQTT broker: aedes on a TCP port, device authentication and the topic rules.
 *
 * How aedes treats our callbacks (aedes 1.2, lib/handlers/publish.js and lib/client.js):
 * - authorizePublish runs before anything else for every PUBLISH (QoS 0, 1, 2). At QoS 1 the PUBACK
 *   (QoS 2: the PUBREC) is written only after its callback returns without error; the server calls it
 *   once the readings are committed, so "acked" means "stored".
 * - aedes reads the next chunk from a socket only when every packet of the previous chunk has
 *   finished; holding the callback therefore stops reading that socket and TCP pushes back on the
 *   device. That is our backpressure.
 * - An error passed to the callback closes the connection (MQTT 3.1.1 has no negative PUBACK;
 *   [MQTT-3.3.5-2] allows either a positive ack or closing). So a bad PAYLOAD is answered with a
 *   positive ack: the device keeps its connection and its good values, the bad ones are counted.
 *   A publish to another engine's topic is a misconfigured or hostile device: it is counted as
 *   wrong_topic and refused with an error, which closes that connection.
 */
import net from 'node:net';
import tls from 'node:tls';
import crypto from 'node:crypto';
import { MAX_PAYLOAD_BYTES } from '../shared/telemetry-payload';
import { engineTopicPrefix, parseEngineTopic } from '../shared/topics';
import type { Logger } from '../server/logger';
import { isSparkplugTopic } from '../shared/sparkplug/topic';
import type { SparkplugHost, SparkplugIdentity } from '../server/telemetry/sparkplug/host';
import { limitPacketSize, type PacketLimits } from './packet-limit';

/**
 * Largest packets the broker takes (declared length after the fixed header). A PUBLISH: the payload
 * limit plus 8 KiB for the topic and MQTT 5 properties, so every payload up to the limit still arrives
 * and is answered (a too-large payload just under this is refused as too_large, the connection kept).
 * A CONNECT carries only ids, a will and credentials: 16 KiB is plenty and caps what an unauthenticated
 * socket can make us hold.
 */
export const PACKET_LIMITS: PacketLimits = { connectBytes: 16 * 1024, packetBytes: MAX_PAYLOAD_BYTES + 8 * 1024 };

export interface DeviceIdentity {
  deviceId: number;
  engineId: number;
  username: string;
  sparkplug?: SparkplugIdentity | null;
}

export interface BrokerOptions {
  port: number;
  host?: string;
  /**
   * `address`: the client's IP address, for throttling failed logins. `'busy'`: not checked now (too many
   * logins of this device waiting), answered "server unavailable" so the device tries again.
   */
  authenticate(
    username: string,
    password: string,
    address: string,
  ): Promise<{ deviceId: number; engineId: number; sparkplug?: SparkplugIdentity | null } | null | 'busy'>;
  /** A telemetry payload on the device's own engine topic; call `done` when there is room for more. */
  onTelemetry(device: DeviceIdentity, engineId: number, payload: Buffer, done: (err?: Error) => void): void;
  onReject(device: DeviceIdentity | null, reason: string, detail: string): void;
  /** A connection closed because a packet declared more than PACKET_LIMITS. */
  onOversizePacket?(declaredBytes: number, beforeConnect: boolean): void;
  log: Logger;
  /** Sparkplug B topics (spBv1.0/...) are handed to it whole: ACL, payload, commands. */
  sparkplug?: Pick<SparkplugHost, 'authorizePublish' | 'maySubscribe' | 'forwards' | 'attach'>;
  /** How long a good username/password stays trusted without a new bcrypt compare (ms). */
  authCacheMs?: number;
  /** MQTT over TLS on a second port (same host), beside plain TCP. */
  tls?: { cert: Buffer; key: Buffer; port: number };
}

export interface Broker {
  port: number;
  /** Port of MQTT over TLS, or null when not configured. */
  tlsPort: number | null;
  connectedClients(): number;
  /** A device was revoked or got a new secret: forget its cached login and close its connections now. */
  dropDevice(deviceId: number): number;
  close(): Promise<void>;
}

// aedes is ESM-only; Node 20.20 can require() it from CommonJS (tsx), which keeps this module synchronous.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const { Aedes } = require('aedes') as { Aedes: { createBroker(opts: object): Promise<AedesLike> } };

interface AedesClient {
  id: string;
  jw?: DeviceIdentity;
  conn?: { remoteAddress?: string };
  close(): void;
}
interface AedesLike {
  clients: Record<string, AedesClient>;
  handle(socket: net.Socket): void;
  publish(packet: object, cb: (err?: Error) => void): void;
  close(cb: () => void): void;
  connectedClients: number;
  on(event: string, listener: (...args: never[]) => void): void;
}
type AuthError = Error & { returnCode?: number };

const sha256 = (s: string) => crypto.createHash('sha256').update(s).digest('hex');

/**
 * Revoke and rotate take effect at once: the device's cached good login is forgotten, its open
 * connections are closed, and a login whose secret check began before the change is refused.
 */
class DeviceDrops {
  generation = 0;
  private readonly droppedAt = new Map<number, number>();

  drop(deviceId: number, goodLogins: Map<string, { device: DeviceIdentity }>, clients: Record<string, AedesClient>): number {
    this.droppedAt.set(deviceId, ++this.generation);
    for (const [username, entry] of goodLogins) if (entry.device.deviceId === deviceId) goodLogins.delete(username);
    let closed = 0;
    for (const client of Object.values(clients)) {
      if (client.jw?.deviceId === deviceId) {
        client.jw = undefined; // nothing more from it is accepted, even before the socket is gone
        client.close();
        closed++;
      }
    }
    return closed;
  }

  droppedSince(deviceId: number, generation: number): boolean {
    return (this.droppedAt.get(deviceId) ?? 0) > generation;
  }
}

export async function createBroker(opts: BrokerOptions): Promise<Broker> {
  const { log } = opts;
  const cacheMs = opts.authCacheMs ?? 30_000;
  // username -> sha256(password) of a recent good login: reconnect storms skip bcrypt
  const goodLogins = new Map<string, { digest: string; until: number; device: DeviceIdentity }>();
  const drops = new DeviceDrops();

  const refuse = (cb: (err: AuthError | null, ok: boolean) => void) => {
    const err: AuthError = new Error('bad username or password');
    err.returnCode = 4;
    cb(err, false);
  };

  const busy = (cb: (err: AuthError | null, ok: boolean) => void) => {
    const err: AuthError = new Error('server busy: try again');
    err.returnCode = 3; // server unavailable: the credentials were not judged
    cb(err, false);
  };

  const aedes = await Aedes.createBroker({
    concurrency: 1000,
    authenticate(client: AedesClient, username: string | undefined, password: Buffer | undefined, cb: (err: AuthError | null, ok: boolean) => void) {
      try {
        if (!username || !password) return refuse(cb);
        const secret = password.toString('utf8');
        const digest = sha256(secret);
        const cached = goodLogins.get(username);
        if (cached && cached.until > Date.now() && cached.digest === digest) {
          client.jw = cached.device;
          return cb(null, true);
        }
        const asked = drops.generation;
        opts.authenticate(username, secret, client.conn?.remoteAddress ?? '').then(
          (found) => {
            if (!found) return refuse(cb);
            if (found === 'busy') return busy(cb);
            // revoked or rotated while its secret was being checked: the answer is stale
            if (drops.droppedSince(found.deviceId, asked)) return refuse(cb);
            const device = { ...found, username };
            goodLogins.set(username, { digest, until: Date.now() + cacheMs, device });
            client.jw = device;
            cb(null, true);
          },
          (err) => {
            log.error('broker: authentication failed with an error', err);
            refuse(cb);
          },
        );
      } catch (err) {
        log.error('broker: authenticate threw', err);
        refuse(cb);
      }
    },
    authorizePublish(client: AedesClient | null, packet: { topic: string; payload: Buffer; qos: number }, cb: (err?: Error | null) => void) {
      try {
        const device = client?.jw;
        if (!device) return cb(new Error('not authenticated'));
        if (opts.sparkplug && isSparkplugTopic(packet.topic)) {
          return opts.sparkplug.authorizePublish(
            device,
            packet.topic,
            Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload ?? ''),
            cb,
          );
        }
        const parsed = parseEngineTopic(packet.topic);
        if (!parsed || parsed.engineId !== device.engineId) {
          opts.onReject(device, 'wrong_topic', `topic "${packet.topic.slice(0, 120)}" is not under ${engineTopicPrefix(device.engineId)}`);
          return cb(new Error('topic not allowed'));
        }
        if (parsed.kind === 'status') return cb(null);
        let called = false;
        let payload = Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload ?? '');
        // The parser hands over a view into the socket's read chunk (up to 64 KiB, shared by the packets
        // that arrived together). The packet is held until its readings are committed, so that view kept the
        // whole chunk alive long enough to be promoted: under a flood the old generation filled with read
        // chunks. A copy of just the payload (same bytes, also kept for aedes) lets the chunk die young.
        if (payload.buffer.byteLength > 2 * payload.length + 1024) {
          payload = Buffer.from(payload);
          packet.payload = payload;
        }
        opts.onTelemetry(device, parsed.engineId, payload, () => {
          if (called) return;
          called = true;
          cb(null); // positive ack even for a bad payload: see the comment at the top
        });
      } catch (err) {
        log.error('broker: authorizePublish threw', err);
        cb(null);
      }
    },
    authorizeSubscribe(client: AedesClient | null, sub: { topic: string; qos: number }, cb: (err: Error | null, sub: unknown) => void) {
      const device = client?.jw;
      if (device && opts.sparkplug && isSparkplugTopic(sub.topic)) return cb(null, opts.sparkplug.maySubscribe(device, sub.topic) ? sub : null);
      // null grants nothing (SUBACK 128) but keeps the connection
      if (!device || !sub.topic.startsWith(engineTopicPrefix(device.engineId))) return cb(null, null);
      cb(null, sub);
    },
    // telemetry is for the server, not for other MQTT subscribers
    authorizeForward(_client: AedesClient, packet: { topic: string }) {
      if (opts.sparkplug && isSparkplugTopic(packet.topic)) return opts.sparkplug.forwards(packet.topic) ? packet : null;
      return packet.topic.endsWith('/telemetry') ? null : packet;
    },
  });

  opts.sparkplug?.attach((topic, payload) => aedes.publish({ cmd: 'publish', topic, payload, qos: 0, retain: false, dup: false }, () => undefined));

  aedes.on('clientError', (client: AedesClient, err: Error) => log.debug(`broker: client ${client?.id} error: ${err.message}`));
  aedes.on('connectionError', (_client: AedesClient, err: Error) => log.debug(`broker: connection error: ${err.message}`));

  const server = net.createServer((socket) => {
    socket.on('error', () => undefined);
    limitPacketSize(socket, PACKET_LIMITS, (declared, beforeConnect) => {
      log.debug(`broker: closed ${socket.remoteAddress}: packet of ${declared} bytes declared${beforeConnect ? ' before CONNECT' : ''}`);
      opts.onOversizePacket?.(declared, beforeConnect);
    });
    aedes.handle(socket);
  });
  const host = opts.host ?? '127.0.0.1';
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : opts.port;
  log.info(`broker: MQTT on ${host}:${port}`);
  const tlsServer = opts.tls ? await listenTls(aedes, host, opts.tls, log) : null;

  return {
    port,
    connectedClients: () => aedes.connectedClients,
    dropDevice: (deviceId) => drops.drop(deviceId, goodLogins, aedes.clients),
    tlsPort: tlsServer ? (tlsServer.address() as net.AddressInfo).port : null,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => undefined);
        tlsServer?.close(() => undefined);
        aedes.close(() => resolve());
      }),
  };
}

/** MQTT over TLS: the same broker behind a TLS listener (devices on a plant network, not loopback). */
async function listenTls(aedes: AedesLike, host: string, opts: { cert: Buffer; key: Buffer; port: number }, log: Logger): Promise<tls.Server> {
  const server = tls.createServer({ cert: opts.cert, key: opts.key, minVersion: 'TLSv1.2' }, (socket) => {
    socket.on('error', () => undefined);
    aedes.handle(socket);
  });
  // a failed handshake (wrong CA on the device, plain TCP on the TLS port) is the client's problem
  server.on('tlsClientError', (err) => log.debug(`broker: TLS handshake failed: ${err.message}`));
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  log.info(`broker: MQTT over TLS on ${host}:${(server.address() as net.AddressInfo).port}`);
  return server;
}
