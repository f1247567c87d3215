/**
 * A plain MQTT broker in its own process, standing in for the external broker of MQTT_URL: aedes with
 * its default in-memory persistence (persistent sessions hold QoS 1 messages for an offline subscriber),
 * any client may connect. Listens on PLAIN_BROKER_PORT; prints "ready" and one "subscribed <clientId>"
 * line per subscription on stdout.
 */
import net from 'node:net';

interface PlainBroker {
  on(event: 'subscribe', listener: (subs: unknown, client: { id: string } | null) => void): void;
  handle(socket: net.Socket): void;
}
// eslint-disable-next-line @typescript-eslint/no-require-imports
const { Aedes } = require('aedes') as { Aedes: { createBroker(opts?: object): Promise<PlainBroker> } };

async function main(): Promise<void> {
  const broker = await Aedes.createBroker();
  broker.on('subscribe', (_subs: unknown, client: { id: string } | null) => process.stdout.write(`subscribed ${client?.id}\n`));
  const server = net.createServer((socket) => {
    socket.on('error', () => undefined);
    broker.handle(socket);
  });
  server.listen(Number(process.env.PLAIN_BROKER_PORT), '127.0.0.1', () => process.stdout.write('ready\n'));
}

main().catch((err) => {
  process.stderr.write(String(err?.stack ?? err) + '\n');
  process.exit(1);
});
