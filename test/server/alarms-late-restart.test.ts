/**
 * An e-mail held for late data survives a crash. Real server processes on one DATA_DIR and database, readings over
 * MQTT with a device's credentials, the real mail catcher: a gateway sends an hour-old overheat (late data, so its
 * e-mail is held until the engine's data catches up), the server is killed with SIGKILL, started again on the same
 * data, and live data arrives still over the limit: the held e-mail goes out once, saying the data came late, with
 * its times in the site's zone. Before migration 0014 the hold lived only in memory and the e-mail was lost.
 */
import fs from 'node:fs';
import bcrypt from 'bcryptjs';
import mqtt, { type MqttClient } from 'mqtt';
import { waitFor } from './support/alarm-db';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';

jest.setTimeout(240_000);

// late data: older than this on arrival; its e-mail waits for the data to catch up (not for this long)
const env = { ALARM_LATE_AFTER_S: '600', ESCALATE_AFTER_S: '3600' };
let server: ServerProcess;
let device: SeededDevice;
let client: MqttClient | null = null;

async function publish(samples: { ts: number; temp: number }[]): Promise<void> {
  client ??= await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, {
    username: device.username,
    password: device.secret,
    reconnectPeriod: 0,
    connectTimeout: 5000,
  });
  const payload = { samples: samples.map((s) => ({ ts: s.ts, values: { engine_speed: 1800, coolant_temp: s.temp, coolant_pressure: 90 } })) };
  await client.publishAsync(`jw/v1/engines/${device.engineId}/telemetry`, JSON.stringify(payload), { qos: 1 });
}

const seconds = (t0: number, n: number, temp: number) => Array.from({ length: n }, (_, i) => ({ ts: t0 + i * 1000, temp }));

async function query<T>(sql: string, params: unknown[] = []): Promise<T[]> {
  const db = new Db(server.databaseUrl);
  try {
    return await db.all<T>(sql, params);
  } finally {
    await db.close();
  }
}

beforeAll(async () => {
  server = await startServerProcess({ env });
  const db = new Db(server.databaseUrl);
  try {
    [device] = await seedFleet(db, 1, 'late');
    await db.run(`UPDATE sites SET time_zone = 'America/Denver' WHERE id = ?`, [device.siteId]);
    const now = new Date().toISOString();
    // nobody on call: the e-mail goes to the planners (escalation level 2)
    await db.run('INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, ?, FALSE, ?, ?)', [
      'planner@example.test',
      'Test planner',
      bcrypt.hashSync('correct-horse-battery', 4),
      'planner',
      now,
      now,
    ]);
  } finally {
    await db.close();
  }
  // a clean restart so the rule engine starts with the seeded engine and site
  await server.stop();
  server = await startServerProcess({ dataDir: server.dataDir, ports: server.ports, env });
});

afterAll(async () => {
  await client?.endAsync().catch(() => undefined);
  await server?.stop('SIGKILL');
  if (server) fs.rmSync(server.dataDir, { recursive: true, force: true });
});

it('a held late-data e-mail is sent once after a kill -9 and restart, when live data shows the alarm still active', async () => {
  const T = Date.now() - 3600_000;
  await publish([...seconds(T, 60, 85), ...seconds(T + 60_000, 300, 100)]); // an hour old: over 98 °C for 5 min
  const [held] = await waitFor(
    async () => {
      const rows = await query<{ id: number; mail_held_since: unknown; active: unknown }>(
        `SELECT id, mail_held_since, active FROM alarms WHERE rule = 'coolant_temp_high' AND mail_held_since IS NOT NULL`,
      );
      return rows.length ? rows : null;
    },
    60_000,
    250,
  );
  expect(await query(`SELECT id FROM outbox`)).toEqual([]);

  await client!.endAsync();
  client = null;
  await server.stop('SIGKILL');
  server = await startServerProcess({ dataDir: server.dataDir, ports: server.ports, env });

  // the gateway's store is empty now; live data, still over the limit
  await publish(seconds(Date.now() - 5000, 5, 100.5));
  const mail = await waitFor(
    async () => {
      const rows = await query<{ subject: string; text: string }>(`SELECT subject, text FROM caught_mail WHERE "to" = ?`, ['planner@example.test']);
      return rows[0] ?? null;
    },
    60_000,
    250,
  );
  expect(mail.subject).toContain('Coolant temperature high');
  expect(mail.subject).toContain('(from late data)');
  expect(mail.text).toMatch(
    /The data came late: the readings behind this alarm were measured at \d{4}-\d{2}-\d{2} \d{2}:\d{2} M[SD]T and arrived at \d{4}-\d{2}-\d{2} \d{2}:\d{2} M[SD]T/,
  );
  expect(mail.text).toMatch(/^Raised: +\d{4}-\d{2}-\d{2} \d{2}:\d{2} M[SD]T$/m);

  // the hold is cleared with the e-mail: more live data sends nothing more
  await waitFor(async () => ((await query(`SELECT id FROM alarms WHERE id = ? AND mail_held_since IS NULL`, [held.id])).length ? true : null), 30_000, 250);
  await publish(seconds(Date.now(), 3, 100.5));
  const health = await waitFor(
    async () => {
      const h = await server.health();
      return h?.ingest?.stored >= 3 ? h : null;
    },
    30_000,
    250,
  );
  expect(health).toBeTruthy();
  expect(await query(`SELECT id FROM outbox WHERE alarm_id = ?`, [held.id])).toHaveLength(1);
});
