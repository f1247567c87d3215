/**
 * The Sparkplug B Primary Host Application's own MQTT connection to an external broker (MQTT_URL), opened only
 * while this server holds the host role (server/cluster/host-role.ts; always with one server). What Eclipse
 * Sparkplug 3.0 asks of a host, by the specification's sections and conformance ids:
 * - "Host Application Session Establishment" (Operational Behavior chapter): CONNECT with a Death Certificate
 *   as the will (topic `spBv1.0/STATE/<host id>`, QoS 1, retained) and Clean Session true
 *   (tck-id-message-flow-phid-sparkplug-clean-session-311); subscribe to the namespace and to its own STATE
 *   topic before publishing its STATE (tck-id-message-flow-phid-sparkplug-subscription): `spBv1.0/#` covers
 *   both, one subscription, so no message comes twice; then publish the Birth Certificate.
 * - "Birth Certificate Message (STATE)" and "Death Certificate Message (STATE)" (Topics chapter, Sparkplug
 *   Host Application): UTF-8 JSON `{"online": true|false, "timestamp": <ms UTC>}`, QoS 1, retain true; the
 *   birth repeats the timestamp of the will registered in this CONNECT
 *   (tck-id-host-topic-phid-birth-payload-timestamp), so an edge node can tell a late will of an older
 *   connection (an older timestamp) from the death of the current one. A clean disconnect publishes the death
 *   first (tck-id-host-topic-phid-death-payload-disconnect-clean).
 * Every server uses the same client id for the role, so the broker itself ends an older holder's connection
 * when a new holder connects. A STATE on our own topic that is not our current birth (a late will) is answered
 * by publishing the birth again, so the retained STATE says online while the role is held.
 * Reconnects (1 s doubling to 30 s) make a new CONNECT with a new timestamp.
 */
import mqtt, { type MqttClient } from 'mqtt';
import type { Logger } from '../../logger';
import { RETRY_MAX_MS, RETRY_MIN_MS } from '../external-broker';

export const SPARKPLUG_NAMESPACE = 'spBv1.0';
export const stateTopic = (hostId: string) => `${SPARKPLUG_NAMESPACE}/STATE/${hostId}`;
export const statePayload = (online: boolean, timestamp: number) => JSON.stringify({ online, timestamp });
/** The role's client id at the broker: the same on every server (one connection at a time). */
export const hostClientId = (hostId: string) => `${hostId}-sparkplug-host`;

export interface HostConnectionOptions {
  url: string;
  hostId: string;
  log: Logger;
  /** A node or device message (NCMD, DCMD and STATE are not passed on); `done` once handled (the PUBACK of QoS 1). */
  onMessage(topic: string, payload: Buffer, done: () => void): void;
  /** Subscribed and STATE online published: ask the nodes for their births now. */
  onOnline(): void;
}

export interface HostConnection {
  /** Commands to edge nodes (NCMD), QoS 0 and not retained as the specification has them. */
  publish(topic: string, payload: Buffer): void;
  online(): boolean;
  /** Publishes STATE offline, then disconnects (the will is not sent). */
  close(): Promise<void>;
}

export function openHostConnection(opts: HostConnectionOptions): HostConnection {
  const topic = stateTopic(opts.hostId);
  let client: MqttClient | null = null;
  let birth = '';
  let isOnline = false;
  let closing = false;
  let retryMs = RETRY_MIN_MS;
  let retryTimer: NodeJS.Timeout | null = null;

  const connect = () => {
    retryTimer = null;
    if (closing) return;
    const timestamp = Date.now();
    birth = statePayload(true, timestamp);
    const c = mqtt.connect(opts.url, {
      clientId: hostClientId(opts.hostId),
      clean: true,
      reconnectPeriod: 0, // a reconnect needs a new will timestamp: a new client each time
      reconnectOnConnackError: false,
      will: { topic, payload: Buffer.from(statePayload(false, timestamp)), qos: 1, retain: true },
    });
    client = c;
    c.handleMessage = (packet, callback) => {
      if (packet.cmd !== 'publish') return callback();
      const payload = Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload);
      if (packet.topic === topic) {
        // our own STATE: anything but our current birth (a late will of an older connection) is answered
        if (isOnline && c === client && payload.toString() !== birth) c.publish(topic, birth, { qos: 1, retain: true });
        return callback();
      }
      if (packet.topic.startsWith(`${SPARKPLUG_NAMESPACE}/STATE/`)) return callback(); // other hosts
      // QoS 1 (a will, NDEATH): acknowledged once handled; QoS 0 (births, data): nothing to acknowledge
      if (packet.qos === 0) {
        opts.onMessage(packet.topic, payload, () => undefined);
        return callback();
      }
      opts.onMessage(packet.topic, payload, () => callback());
    };
    c.on('connect', () => {
      retryMs = RETRY_MIN_MS;
      c.subscribe(`${SPARKPLUG_NAMESPACE}/#`, { qos: 1 }, (err) => {
        if (err || c !== client) {
          if (err) opts.log.error('sparkplug host: subscribe failed', err);
          c.end(true);
          return;
        }
        c.publish(topic, birth, { qos: 1, retain: true }, (perr) => {
          if (perr || c !== client) return;
          isOnline = true;
          opts.log.info(`sparkplug host: online as "${opts.hostId}" (STATE published)`);
          opts.onOnline();
        });
      });
    });
    c.on('error', (err) => opts.log.warn(`sparkplug host: ${err.message}`));
    c.on('close', () => {
      if (c !== client) return;
      if (isOnline) opts.log.warn('sparkplug host: connection lost, reconnecting');
      isOnline = false;
      client = null;
      c.end(true);
      if (closing) return;
      retryTimer = setTimeout(connect, retryMs);
      retryMs = Math.min(RETRY_MAX_MS, retryMs * 2);
    });
  };
  connect();

  return {
    publish(t, payload) {
      if (client?.connected) client.publish(t, payload, { qos: 0 });
    },
    online: () => isOnline,
    async close() {
      closing = true;
      if (retryTimer) clearTimeout(retryTimer);
      const c = client;
      client = null;
      isOnline = false;
      if (!c) return;
      if (c.connected) {
        const death = JSON.parse(birth) as { timestamp: number };
        await Promise.race([
          c.publishAsync(topic, statePayload(false, death.timestamp), { qos: 1, retain: true }).catch(() => undefined),
          new Promise((r) => setTimeout(r, 2000)),
        ]);
      }
      await c.endAsync().catch(() => undefined);
    },
  };
}
