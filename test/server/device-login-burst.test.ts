/**
 * Many devices behind one address (a plant gateway's NAT) connecting at once, against a real server
 * process and its MQTT port: every one is let in, after a restart too (no login cache then). The secrets are hashed at a real cost so the checks queue up.
 */
import bcrypt from 'bcryptjs';
import mqtt, { type MqttClient } from 'mqtt';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';

const DEVICES = 500;
const SECRET = 'gateway-behind-nat-secret-31';

let server: ServerProcess;
let db: Db;
let fleet: SeededDevice[];

/** Every device at once, from 127.0.0.1; the CONNACK answer of each (0: accepted). */
async function connectAll(): Promise<{ clients: MqttClient[]; refused: string[] }> {
  const refused: string[] = [];
  const clients: MqttClient[] = [];
  await Promise.all(
    fleet.map(async (d) => {
      try {
        clients.push(
          await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, {
            username: d.username,
            password: SECRET,
            reconnectPeriod: 0,
            connectTimeout: 110_000,
          }),
        );
      } catch (err) {
        refused.push(`${d.username}: ${err instanceof Error ? err.message : String(err)}`);
      }
    }),
  );
  return { clients, refused };
}

const closeAll = (clients: MqttClient[]) => Promise.all(clients.map((c) => c.endAsync(true)));

beforeAll(async () => {
  server = await startServerProcess();
  db = new Db(server.databaseUrl);
  fleet = await seedFleet(db, DEVICES, 'nat');
  // one real-cost hash for all: each check costs the server some milliseconds, so hundreds wait at once
  await db.run(`UPDATE devices SET secret_hash = ? WHERE username LIKE 'nat%'`, [bcrypt.hashSync(SECRET, 8)]);
}, 120_000);

afterAll(async () => {
  await server?.stop('SIGTERM');
  await db?.close();
});

test(`${DEVICES} devices from one address connect at once: all let in, and again after a restart`, async () => {
  const first = await connectAll();
  expect(first.refused).toEqual([]);
  expect(first.clients).toHaveLength(DEVICES);
  await closeAll(first.clients);

  // the server restarts (its login cache is gone): every device reconnects at once and is checked again
  await server.stop('SIGKILL');
  server = await startServerProcess({ dataDir: server.dataDir, ports: server.ports });
  const again = await connectAll();
  expect(again.refused).toEqual([]);
  expect(again.clients).toHaveLength(DEVICES);
  await closeAll(again.clients);
}, 240_000);
