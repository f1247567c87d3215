/** The bound on concurrent password hashing: fair per address, failed addresses behind the others. */
import { HashGate } from '../../server/auth/hash-gate';

/** A job we finish by hand, recording when it started. */
function manual(started: string[], name: string, result: boolean) {
  let finish!: () => void;
  const done = new Promise<void>((r) => {
    finish = r;
  });
  return {
    job: () => {
      started.push(name);
      return done.then(() => result);
    },
    finish: () => finish(),
  };
}

const tick = () => new Promise((r) => setImmediate(r));

test('at most N checks run at once; a new address goes before a flooding one', async () => {
  const gate = new HashGate(2);
  const started: string[] = [];
  const flood = Array.from({ length: 50 }, (_, i) => manual(started, `flood-${i}`, false));
  const runs = flood.map((f, i) => gate.run('203.0.113.1', f.job, `sprayed-${i}@example.test`));
  const good = manual(started, 'good', true);
  const goodRun = gate.run('198.51.100.2', good.job);
  await tick();
  expect(started).toEqual(['flood-0', 'flood-1']);
  flood[0].finish();
  await runs[0];
  await tick();
  // the flooding address failed: the other address is served next, not after 48 more
  expect(started).toEqual(['flood-0', 'flood-1', 'good']);
  good.finish();
  expect(await goodRun).toBe(true);
  for (const f of flood) f.finish();
  await Promise.all(runs);
  expect(started).toHaveLength(51);
});

test('refuses at once when one address has too many waiting', async () => {
  const gate = new HashGate(1, 3);
  const started: string[] = [];
  const jobs = Array.from({ length: 4 }, (_, i) => manual(started, `j${i}`, false));
  const runs = jobs.map((j) => gate.run('a', j.job));
  await expect(gate.run('a', manual(started, 'over', false).job)).rejects.toThrow(/too many/);
  for (const j of jobs) j.finish();
  await Promise.all(runs);
});

test('many accounts behind one address (a gateway behind NAT) all wait their turn; one account cannot pile up checks', async () => {
  const gate = new HashGate(2, 4);
  const started: string[] = [];
  // 500 devices reconnecting at once from one address, each with its own account
  const devices = Array.from({ length: 500 }, (_, i) => manual(started, `dev-${i}`, true));
  const runs = devices.map((d, i) => gate.run('192.0.2.10', d.job, `device-${i}`));
  // one account over its limit from that address is refused at once, the others are not
  const same = Array.from({ length: 4 }, (_, i) => manual(started, `same-${i}`, false));
  const sameRuns = same.map((j) => gate.run('192.0.2.10', j.job, 'device-x'));
  await expect(gate.run('192.0.2.10', manual(started, 'over', false).job, 'device-x')).rejects.toThrow(/too many/);
  expect(gate.waiting).toBe(502);
  for (const d of devices) d.finish();
  for (const j of same) j.finish();
  expect(await Promise.all(runs)).toEqual(devices.map(() => true));
  await Promise.all(sameRuns);
  expect(started).toHaveLength(504);
  // the account's count was given back as its checks ran: it may wait again
  const again = manual(started, 'again', true);
  const againRun = gate.run('192.0.2.10', again.job, 'device-x');
  again.finish();
  expect(await againRun).toBe(true);
});
