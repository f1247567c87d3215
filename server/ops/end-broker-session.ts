/**
 * `npm run end-broker-session -- --confirm-stopped`: for a server taken away for good, with the environment of
 * that server (MQTT_URL, MQTT_CLIENT_ID). Its persistent session at the external broker outlives it and stays a
 * member of the shared subscription group: mosquitto 2.0 goes on dealing it its share of every device's
 * messages and queues them for a client that never returns, so those readings are never stored (measured with
 * `BENCH_SCALE`: a third lost to one such session beside two live servers). This connects once with the same
 * client id and a clean session, which makes the broker discard the old session and its place in the group.
 *
 * Only for a stopped server: on a running one the broker would cut its connection and drop the messages it
 * had delivered but not yet had acknowledged. Hence the explicit flag.
 */
import { parseArgs } from 'node:util';
import mqtt from 'mqtt';
import { loadConfig } from '../config';

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { 'confirm-stopped': { type: 'boolean' }, 'client-id': { type: 'string' } } });
  const config = loadConfig();
  if (!config.mqttUrl) throw new Error('MQTT_URL is not set: with the embedded broker there is no session to end');
  const clientId = values['client-id'] ?? config.mqttClientId;
  if (!values['confirm-stopped'])
    throw new Error(`this ends the broker session of client id "${clientId}"; run it only once that server is stopped for good, with --confirm-stopped`);
  const client = await mqtt.connectAsync(config.mqttUrl, { clientId, clean: true, reconnectPeriod: 0, connectTimeout: 10_000 });
  await client.endAsync();
  process.stdout.write(`the broker session of client id "${clientId}" is ended: it is no longer in the shared group; do not reuse this client id\n`);
}

main().catch((err: unknown) => {
  process.stderr.write(`end-broker-session failed: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
