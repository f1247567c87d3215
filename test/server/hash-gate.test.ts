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
  const runs = flood.map((f) => gate.run('203.0.113.1', f.job));
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
