/**
 * Crash-test device (a child process): publishes `messages` QoS 1 telemetry messages of `samplesPerMsg`
 * samples x 5 channels, timestamps unique (message m, sample k: baseTs + m * samplesPerMsg + k ms),
 * keeping `window` messages in flight. Every message whose PUBACK arrives is appended at once to
 * `ackFile` ("m\n", synchronous write). When the server goes away, mqtt.js reconnects and resends what
 * was not acknowledged, as a device does. Exits 0 once every message is acknowledged.
 */
import fs from 'node:fs';
import mqtt from 'mqtt';
import { telemetryTopic } from '../../../shared/topics';

interface Job {
  mqttPort: number;
  username: string;
  secret: string;
  engineId: number;
  messages: number;
  samplesPerMsg: number;
  baseTs: number;
  window: number;
  ackFile: string;
}
const job: Job = JSON.parse(process.env.JW_PUBLISHER_JOB ?? '{}');

function payload(m: number): string {
  const parts: string[] = [];
  for (let k = 0; k < job.samplesPerMsg; k++) {
    const ts = job.baseTs + m * job.samplesPerMsg + k;
    parts.push(
      `{"ts":${ts},"values":{"coolant_temp":${80 + (k % 7)},"coolant_pressure":96.5,"coolant_conductivity":2400,"engine_speed":1800,"ambient_temp":21.5}}`,
    );
  }
  return `{"samples":[${parts.join(',')}]}`;
}

const client = mqtt.connect(`mqtt://127.0.0.1:${job.mqttPort}`, {
  username: job.username,
  password: job.secret,
  clientId: `crash-test-${job.engineId}`,
  reconnectPeriod: 100,
  connectTimeout: 5000,
  keepalive: 10,
});
client.on('error', () => undefined); // refused while the server restarts: mqtt.js retries
const ackFd = fs.openSync(job.ackFile, 'a');
const topic = telemetryTopic(job.engineId);
let next = 0;
let acked = 0;

function send(): void {
  if (next >= job.messages) return;
  const m = next++;
  // while offline, mqtt.js keeps the message and sends it after the reconnect; unacked ones are resent
  client.publish(topic, payload(m), { qos: 1 }, (err) => {
    if (err) {
      process.stderr.write(`publish ${m} failed: ${err.message}\n`);
      process.exit(2);
    }
    fs.writeSync(ackFd, `${m}\n`);
    if (++acked === job.messages) {
      fs.closeSync(ackFd);
      client.end(true, () => process.exit(0));
      return;
    }
    send();
  });
}

client.once('connect', () => {
  for (let i = 0; i < job.window; i++) send();
});
