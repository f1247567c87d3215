/**
 * MQTT_URL set: no embedded broker; the server subscribes to every engine's telemetry on the external
 * broker (which authenticates devices itself) and feeds the same ingest. Sparkplug B (spBv1.0/#) is not taken
 * here: the server holding the Sparkplug host role has its own connection for it (sparkplug/host-connection.ts).
 *
 * mqtt.js (5.x, lib/handlers/publish) handles incoming packets one at a time: the next packet is taken
 * only when handleMessage calls back, and a callback without error sends the PUBACK. Holding that callback
 * until the commit would allow one message per flush. So the two are split: once the buffer has room the
 * callback is called with a marker error, which makes mqtt.js go on to the next packet WITHOUT a PUBACK;
 * after the commit the PUBACK is sent here. A message never acked (server killed) is redelivered by the
 * broker (persistent session: clean false, fixed client id). Backpressure: no room, no next message.
 */
import mqtt from 'mqtt';
import { parseEngineTopic, TOPIC_ROOT } from '../../shared/topics';
import type { Logger } from '../logger';
import type { BrokerState } from './types';

export interface ExternalSubscriberOptions {
  url: string;
  clientId: string;
  /** MQTT_SHARED_GROUP: `$share/<group>/...`, the broker hands each message to one server of the group. */
  sharedGroup?: string | null;
  log: Logger;
  ingest(deviceId: number | null, engineId: number, payload: Buffer, done: () => void, readMore?: () => void): void;
}

/** Passed to mqtt.js's handleMessage callback: "go on, but do not acknowledge" (we do after the commit). */
const ACK_LATER = Object.assign(new Error('acknowledged after commit'), { code: 'JW_ACK_LATER' });

type PubackSender = { _sendPacket?(packet: { cmd: 'puback'; messageId: number }, cb?: () => void): void };

/** Reconnect back-off: 1 s doubling to 30 s; back to 1 s once connected. */
export const RETRY_MIN_MS = 1000;
export const RETRY_MAX_MS = 30_000;

export async function startExternalSubscriber(opts: ExternalSubscriberOptions): Promise<{ close(): Promise<void>; state(): BrokerState }> {
  // refused credentials are retried too (mqtt.js gives up on a refused CONNACK unless told otherwise)
  const client = mqtt.connect(opts.url, { clientId: opts.clientId, clean: false, reconnectPeriod: RETRY_MIN_MS, reconnectOnConnackError: true });
  const state: BrokerState = { connected: false, lastError: 'connecting', retryInMs: RETRY_MIN_MS, since: new Date().toISOString() };
  const change = (connected: boolean, lastError: string | null) => {
    if (state.connected !== connected) state.since = new Date().toISOString();
    state.connected = connected;
    state.lastError = lastError;
  };
  let lastLogged = '';
  client.on('close', () => {
    if (state.connected) {
      change(false, 'connection lost');
      opts.log.warn('external broker: connection lost, retrying');
    } else {
      // one more failed attempt: wait longer before the next
      state.retryInMs = Math.min(RETRY_MAX_MS, state.retryInMs * 2);
    }
    client.options.reconnectPeriod = state.retryInMs;
  });
  // mqtt.js sends the PUBACK when handleMessage calls back
  const sender = client as unknown as PubackSender;
  client.handleMessage = (packet, callback) => {
    try {
      if (packet.cmd !== 'publish') return callback();
      const parsed = parseEngineTopic(packet.topic);
      if (!parsed || parsed.kind !== 'telemetry') return callback();
      const payload = Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload);
      const messageId = packet.messageId;
      if (packet.qos !== 1 || messageId === undefined || typeof sender._sendPacket !== 'function') {
        // QoS 0 (nothing to ack), or a client without the hook: the callback is the ack, held until the commit
        opts.ingest(null, parsed.engineId, payload, () => callback());
        return;
      }
      let next = false;
      opts.ingest(
        null,
        parsed.engineId,
        payload,
        () => sender._sendPacket!({ cmd: 'puback', messageId }),
        () => {
          if (!next) {
            next = true;
            callback(ACK_LATER);
          }
        },
      );
    } catch (err) {
      opts.log.error('external broker: message handling failed', err);
      callback();
    }
  };
  client.on('error', (err) => {
    change(false, err.message);
    // the same refusal on every retry is logged once, not every few seconds
    if (err.message !== lastLogged) opts.log.warn(`external broker: ${err.message}; retrying with back-off`);
    lastLogged = err.message;
  });
  client.on('connect', () => {
    change(true, null);
    lastLogged = '';
    state.retryInMs = RETRY_MIN_MS;
    client.options.reconnectPeriod = RETRY_MIN_MS;
    const topic = `${TOPIC_ROOT}/+/telemetry`;
    client.subscribe(opts.sharedGroup ? `$share/${opts.sharedGroup}/${topic}` : topic, { qos: 1 }, (err) => {
      if (err) opts.log.error('external broker: subscribe failed', err);
      else opts.log.info(`external broker: subscribed at ${opts.url.replace(/\/\/[^@]*@/, '//')}`);
    });
  });
  return {
    close: () => client.endAsync().then(() => undefined),
    state: () => ({ ...state }),
  };
}
