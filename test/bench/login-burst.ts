/**
 * Bench figure: how long a good sign-in and a good device connect take while a burst of wrong
 * passwords arrives (HTTP from other addresses through a trusted proxy header, MQTT from loopback).
 * Its own server process (TRUST_PROXY=loopback so attacker and user have different addresses).
 * Run alone: `npx tsx test/bench/login-burst.ts`.
 */
import { execFile } from 'node:child_process';
import http from 'node:http';
import bcrypt from 'bcryptjs';
import mqtt from 'mqtt';
import { Db, seedFleet, startServerProcess } from '../server/support/telemetry-server';

export interface LoginBurstFigures {
  quietMs: number;
  underBurstMs: number;
  status: number;
  deviceQuietMs: number;
  deviceUnderBurstMs: number;
  burstAnswers: Record<string, number>;
}

export async function loginUnderBurst(httpBurst = 200, mqttBurst = 300): Promise<LoginBurstFigures> {
  const server = await startServerProcess({ env: { TRUST_PROXY: 'loopback', LOG_LEVEL: 'error' } });
  const db = new Db(server.dbFile);
  try {
    const password = 'bench-good-password-1234';
    const now = new Date().toISOString();
    // cost 10, as a real account has
    await db.run(`INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, 'operator', 0, ?, ?)`, [
      'bench-person@example.test',
      'Bench person',
      bcrypt.hashSync(password, 10),
      now,
      now,
    ]);
    const [device] = await seedFleet(db, 1, 'burst');
    // one fresh connection per request (no client-side pool): the burst must not queue the good one in this process
    const signIn = (email: string, pw: string, from: string) =>
      new Promise<{ ms: number; status: number }>((resolve, reject) => {
        const started = performance.now();
        const body = JSON.stringify({ email, password: pw });
        const req = http.request(
          `${server.url}/api/auth/login`,
          { method: 'POST', agent: false, headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body), 'x-forwarded-for': from } },
          (res) => {
            res.resume();
            res.on('end', () => resolve({ ms: performance.now() - started, status: res.statusCode ?? 0 }));
          },
        );
        req.on('error', reject);
        req.end(body);
      });
    // the good sign-in from its own process (curl), so this process's load from the burst does not count
    const curlSignIn = (email: string, pw: string, from: string) =>
      new Promise<{ ms: number; status: number }>((resolve, reject) => {
        execFile(
          'curl',
          [
            '-s',
            '-o',
            '/dev/null',
            '-w',
            '%{http_code} %{time_total}',
            '-H',
            'content-type: application/json',
            '-H',
            `x-forwarded-for: ${from}`,
            '--data',
            JSON.stringify({ email, password: pw }),
            `${server.url}/api/auth/login`,
          ],
          (err, out) => {
            if (err) return reject(err);
            const [code, secs] = out.trim().split(' ');
            resolve({ ms: Number(secs) * 1000, status: Number(code) });
          },
        );
      });
    const deviceConnect = async () => {
      const started = performance.now();
      const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, {
        username: device.username,
        password: device.secret,
        reconnectPeriod: 0,
        connectTimeout: 60_000,
      });
      const ms = performance.now() - started;
      await c.endAsync();
      return ms;
    };
    const quiet = await curlSignIn('bench-person@example.test', password, '198.51.100.1');
    const deviceQuietMs = await deviceConnect();
    const answers: Record<string, number> = {};
    const burst = [
      ...Array.from({ length: httpBurst }, (_, i) =>
        signIn(`nobody${i}@example.test`, 'Winter-2026!!', `203.0.113.${(i % 5) + 1}`).then((r) => {
          answers[`http ${r.status}`] = (answers[`http ${r.status}`] ?? 0) + 1;
        }),
      ),
      ...Array.from({ length: mqttBurst }, () =>
        mqtt
          .connectAsync(`mqtt://127.0.0.1:${server.mqttPort}`, { username: device.username, password: 'wrong', reconnectPeriod: 0, connectTimeout: 60_000 })
          .then(
            (c) => c.endAsync(),
            () => {
              answers['mqtt refused'] = (answers['mqtt refused'] ?? 0) + 1;
            },
          ),
      ),
    ];
    await new Promise((r) => setTimeout(r, 100)); // the burst is in flight
    const [good, deviceUnderBurstMs] = await Promise.all([curlSignIn('bench-person@example.test', password, '198.51.100.2'), deviceConnect().catch(() => NaN)]);
    await Promise.all(burst);
    return { quietMs: quiet.ms, underBurstMs: good.ms, status: good.status, deviceQuietMs, deviceUnderBurstMs, burstAnswers: answers };
  } finally {
    await db.close();
    await server.stop('SIGTERM');
  }
}

if (require.main === module) {
  loginUnderBurst().then(
    (f) => {
      console.log(
        `good sign-in (curl, own process): ${f.quietMs.toFixed(0)} ms quiet, ${f.underBurstMs.toFixed(0)} ms (HTTP ${f.status}) under a burst of 200 wrong sign-ins from 5 addresses + 300 wrong MQTT logins`,
      );
      console.log(
        `good device connect: ${f.deviceQuietMs.toFixed(0)} ms quiet, ${f.deviceUnderBurstMs.toFixed(0)} ms under the burst; burst answers ${JSON.stringify(f.burstAnswers)}`,
      );
      process.exit(0);
    },
    (err) => {
      console.error(err);
      process.exit(1);
    },
  );
}
