/**
 * Benchmark publisher (a child process): connects as the given devices and publishes telemetry.
 *   flood: each device keeps `window` publishes in flight, `samples` payloads, for durationMs.
 *   paced: each device publishes one single-form message with every channel once a second.
 * Prints one JSON line with what was published: acknowledged by the broker at QoS 1; at QoS 0 only
 * handed to TCP (no acknowledgement exists), so the server may receive it later or never.
 * A QoS 0 flood stops at its deadline even when writes are stalled by backpressure, and then drops
 * its connections (force end): the run is bounded in time.
 */
import mqtt, { type MqttClient } from 'mqtt';
import { telemetryTopic } from '../../shared/topics';

interface Job {
  mqttPort: number;
  devices: Array<{ username: string; secret: string; engineId: number }>;
  mode: 'flood' | 'paced';
  qos: 0 | 1;
  durationMs: number;
  window: number;
  samplesPerMsg: number;
  /** Sample timestamps start here (ms) and step 1 ms per sample, per engine. */
  baseTs: number;
}

const job: Job = JSON.parse(process.env.BENCH_JOB ?? '{}');

function samplesPayload(state: { next: number }, n: number): string {
  const parts: string[] = new Array(n);
  for (let i = 0; i < n; i++) {
    // 1 Hz samples of a steady running engine with a little sensor noise (no alarm should fire)
    const ts = state.next;
    state.next += 1000;
    const k = ts / 1000;
    const n = (a: number) => (Math.sin(k * a) + Math.sin(k * a * 2.7)) / 2;
    parts[i] =
      `{"ts":${ts},"values":{"coolant_temp":${(82 + 0.3 * n(0.13)).toFixed(2)},"coolant_pressure":${(96.5 + 0.8 * n(0.21)).toFixed(2)},` +
      `"coolant_conductivity":${(2400 + 15 * n(0.07)).toFixed(1)},"engine_speed":${(1800 + 4 * n(0.5)).toFixed(1)},"ambient_temp":${(21.5 + 0.2 * n(0.03)).toFixed(2)}}}`;
  }
  return `{"samples":[${parts.join(',')}]}`;
}

/** Devices connecting at once per publisher. */
const CONNECT_WAVE = 80;

async function main(): Promise<void> {
  // in waves: the server lets at most 200 logins per address wait for a password check (server/auth/hash-gate.ts),
  // and two publishers of 1,000 devices each would pass that
  const clients: MqttClient[] = [];
  for (let i = 0; i < job.devices.length; i += CONNECT_WAVE)
    clients.push(
      ...(await Promise.all(
        job.devices
          .slice(i, i + CONNECT_WAVE)
          .map((d) =>
            mqtt.connectAsync(`mqtt://127.0.0.1:${job.mqttPort}`, { username: d.username, password: d.secret, reconnectPeriod: 0, connectTimeout: 30_000 }),
          ),
      )),
    );
  process.stdout.write(JSON.stringify({ ready: true }) + '\n');
  await new Promise<void>((resolve) => process.stdin.once('data', () => resolve())); // go signal
  let readings = 0;
  let messages = 0;
  let failed = 0;
  const end = Date.now() + job.durationMs;
  if (job.mode === 'flood') {
    const lanes = Promise.all(
      clients.map(async (c, idx) => {
        const topic = telemetryTopic(job.devices[idx].engineId);
        const state = { next: job.baseTs };
        const lane = async () => {
          while (Date.now() < end) {
            const payload = samplesPayload(state, job.samplesPerMsg);
            try {
              await c.publishAsync(topic, payload, { qos: job.qos });
              readings += job.samplesPerMsg * 5;
              messages++;
            } catch {
              failed++;
              return;
            }
          }
        };
        await Promise.all(Array.from({ length: job.window }, lane));
      }),
    );
    // QoS 1: every publish in flight is waited for (it counts once acknowledged), within a bound;
    // QoS 0: a write stalled by TCP backpressure is not waited for
    const grace = job.qos === 1 ? 60_000 : 0;
    await Promise.race([lanes, new Promise((r) => setTimeout(r, Math.max(0, end - Date.now()) + grace))]);
  } else {
    const channels = (t: number) => {
      const k = t / 1000;
      return (
        `"coolant_temp":${(82 + 0.3 * Math.sin(k * 0.13)).toFixed(2)},"coolant_pressure":${(96.5 + 0.8 * Math.sin(k * 0.21)).toFixed(2)},` +
        `"coolant_conductivity":${(2400 + 15 * Math.sin(k * 0.07)).toFixed(1)},"engine_speed":${(1800 + 4 * Math.sin(k * 0.5)).toFixed(1)},"ambient_temp":${(21.5 + 0.2 * Math.sin(k * 0.03)).toFixed(2)}`
      );
    };
    const pending: Promise<unknown>[] = [];
    while (Date.now() < end) {
      const tickStart = Date.now();
      for (let i = 0; i < clients.length; i++) {
        const ts = Date.now();
        pending.push(
          clients[i].publishAsync(telemetryTopic(job.devices[i].engineId), `{"ts":${ts},"values":{${channels(ts)}}}`, { qos: job.qos }).then(
            () => {
              readings += 5;
              messages++;
            },
            () => {
              failed++;
            },
          ),
        );
        // spread the devices over the second, like independent gateways
        if (i % 25 === 24) await new Promise((r) => setTimeout(r, Math.max(0, (1000 / clients.length) * 25 - 2)));
      }
      const rest = 1000 - (Date.now() - tickStart);
      if (rest > 0) await new Promise((r) => setTimeout(r, rest));
    }
    await Promise.all(pending);
  }
  const result = { readings, messages, failed };
  const force = job.qos === 0;
  await Promise.race([Promise.all(clients.map((c) => c.endAsync(force))), new Promise((r) => setTimeout(r, 5000))]);
  process.stdout.write(JSON.stringify(result) + '\n', () => process.exit(0));
}

main().catch((err) => {
  process.stderr.write(String(err?.stack ?? err) + '\n');
  process.exit(1);
});
