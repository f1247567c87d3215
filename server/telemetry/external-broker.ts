/**
 * MQTT_URL set: no embedded broker; the server subscribes to every engine's telemetry on the external
 * broker (which authenticates devices itself) and feeds the same ingest. The ack of each QoS 1 message
 * is held until the buffer has room, so backpressure reaches the external broker too.
 */
import mqtt from 'mqtt';
import { parseEngineTopic, TOPIC_ROOT } from '../../shared/topics';
import type { Logger } from '../logger';

export interface ExternalSubscriberOptions {
  url: string;
  log: Logger;
  ingest(deviceId: number | null, engineId: number, payload: Buffer, done: () => void): void;
}

export async function startExternalSubscriber(opts: ExternalSubscriberOptions): Promise<{ close(): Promise<void> }> {
  const client = mqtt.connect(opts.url, { clientId: `jacketwatch-server-${process.pid}`, clean: false, reconnectPeriod: 2000 });
  // mqtt.js sends the PUBACK when handleMessage calls back
  client.handleMessage = (packet, callback) => {
    try {
      if (packet.cmd !== 'publish') return callback();
      const parsed = parseEngineTopic(packet.topic);
      if (!parsed || parsed.kind !== 'telemetry') return callback();
      const payload = Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload);
      opts.ingest(null, parsed.engineId, payload, () => callback());
    } catch (err) {
      opts.log.error('external broker: message handling failed', err);
      callback();
    }
  };
  client.on('error', (err) => opts.log.warn('external broker: ' + err.message));
  client.on('connect', () => {
    client.subscribe(`${TOPIC_ROOT}/+/telemetry`, { qos: 1 }, (err) => {
      if (err) opts.log.error('external broker: subscribe failed', err);
      else opts.log.info(`external broker: subscribed at ${opts.url.replace(/\/\/[^@]*@/, '//')}`);
    });
  });
  return { close: () => client.endAsync().then(() => undefined) };
}
