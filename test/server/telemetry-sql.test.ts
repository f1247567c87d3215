/**
 * The writer's JSON insert on a real SQLite database (node-sqlite3, in memory, the readings schema and its
 * unique index): every value that travels as JSON comes back bit for bit, with the same storage types as a
 * bound number, and the values that cannot travel that way are refused so the writer binds them instead.
 * SQLite only: PostgreSQL keeps the bound insert.
 */
import sqlite3 from 'sqlite3';
import { exactValueParts, INSERT_READINGS_JSON_SQL, insertReadingsSql, readingsJson } from '../../server/telemetry/sql';

let db: sqlite3.Database;
const exec = (sql: string) => new Promise<void>((resolve, reject) => db.exec(sql, (err) => (err ? reject(err) : resolve())));
const all = <T>(sql: string, params: unknown[] = []) =>
  new Promise<T[]>((resolve, reject) => db.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
const runChanges = (sql: string, params: unknown[]) =>
  new Promise<number>((resolve, reject) =>
    db.run(sql, params, function (err) {
      if (err) reject(err);
      else resolve(this.changes);
    }),
  );

/** Rows as the writer holds them: columns. */
function columns(values: number[], engine = 7, t0 = 1_780_000_000_000) {
  return {
    engine: values.map(() => engine),
    channel: values.map((_, i) => 1 + (i % 5)),
    ts: values.map((_, i) => t0 + i * 1000),
    value: values,
    quality: values.map((_, i) => i % 2),
  };
}
const json = (c: ReturnType<typeof columns>) => readingsJson(c.engine, c.channel, c.ts, c.value, c.quality, 0, c.value.length);

beforeEach(async () => {
  db = new sqlite3.Database(':memory:');
  await exec(`CREATE TABLE readings (engine_id INTEGER NOT NULL, channel INTEGER NOT NULL, ts BIGINT NOT NULL, value DOUBLE PRECISION NOT NULL, quality INTEGER NOT NULL DEFAULT 0);
    CREATE UNIQUE INDEX readings_engine_channel_ts ON readings (engine_id, channel, ts);`);
});
afterEach(() => new Promise<void>((resolve) => db.close(() => resolve())));

describe('the JSON insert of readings', () => {
  it('stores 100,000 random doubles bit for bit (SQLite parsing their decimal text missed about 1 in 16,000 by 1 ulp when measured)', async () => {
    // a fixed-seed generator: random bit patterns (wide exponents) and sensor-like values with many digits
    let seed = 2026;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    const f64 = new Float64Array(1);
    const u32 = new Uint32Array(f64.buffer);
    const values: number[] = [];
    while (values.length < 100_000) {
      u32[0] = Math.floor(rnd() * 2 ** 32);
      u32[1] = Math.floor(rnd() * 2 ** 32);
      const candidates = [f64[0], (rnd() - 0.5) * 1e6, ((rnd() * 300 - 40 - 32) * 5) / 9, Math.round(rnd() * 1e5) / 100];
      for (const v of candidates) if (exactValueParts(v) !== null && values.length < 100_000) values.push(v);
    }
    const c = columns(values);
    for (let i = 0; i < values.length; i += 500) {
      const text = readingsJson(c.engine, c.channel, c.ts, c.value, c.quality, i, 500);
      expect(await runChanges(INSERT_READINGS_JSON_SQL, [text])).toBe(500);
    }
    const rows = await all<{ ts: number; value: number; channel: number; quality: number }>('SELECT ts, value, channel, quality FROM readings ORDER BY ts');
    expect(rows).toHaveLength(values.length);
    let differ = 0;
    for (let i = 0; i < rows.length; i++) if (!Object.is(rows[i].value, values[i]) || rows[i].ts !== c.ts[i] || rows[i].channel !== c.channel[i]) differ++;
    expect(differ).toBe(0);
  });

  it('stores the same types as the bound insert (REAL value, INTEGER time), whole numbers included', async () => {
    const values = [85, 82.5, -0, 0, 124.412543754923, 9007199254740991, 1e-20];
    const a = columns(values, 1);
    const b = columns(values, 2);
    expect(await runChanges(INSERT_READINGS_JSON_SQL, [json(a)])).toBe(values.length);
    expect(
      await runChanges(
        insertReadingsSql(values.length, false),
        b.engine.flatMap((e, i) => [e, b.channel[i], b.ts[i], b.value[i], b.quality[i]]),
      ),
    ).toBe(values.length);
    const typed = await all<{ engine_id: number; t: string; v: string; q: string; value: number; quality: number }>(
      'SELECT engine_id, typeof(ts) AS t, typeof(value) AS v, typeof(quality) AS q, value, quality FROM readings ORDER BY engine_id, ts',
    );
    const of = (e: number) => typed.filter((r) => r.engine_id === e).map(({ t, v, q, value, quality }) => ({ t, v, q, value, quality }));
    expect(of(1)).toEqual(of(2));
    expect(of(1).every((r) => r.t === 'integer' && r.v === 'real' && r.q === 'integer')).toBe(true);
  });

  it('skips readings already stored and says so by its count of changes', async () => {
    const c = columns([80, 81, 82]);
    expect(await runChanges(INSERT_READINGS_JSON_SQL, [json(c)])).toBe(3);
    const again = columns([80, 81, 82, 83]);
    expect(await runChanges(INSERT_READINGS_JSON_SQL, [json(again)])).toBe(1);
    expect((await all<{ n: number }>('SELECT COUNT(*) AS n FROM readings'))[0].n).toBe(4);
  });

  it('refuses what it cannot carry exactly: not finite, subnormal, huge non-integers, tiny values, fractional times', () => {
    for (const v of [NaN, Infinity, -Infinity, 5e-324, 2 ** -1030, 2 ** 60 + 2 ** 8, 1e300, 1e-30]) expect(exactValueParts(v)).toBeNull();
    for (const v of [0, -0, 1, -1, 82.13, 2 ** 53 - 1, 1e-15, 1e15 + 0.5]) expect(exactValueParts(v)).not.toBeNull();
    expect(exactValueParts(-0)).toBe('0,0,0');
    expect(exactValueParts(0.5)).toBe(`${2 ** 52},53,0`);
    const c = columns([80, 5e-324]);
    expect(json(c)).toBeNull();
    const t = columns([80, 81]);
    t.ts[1] += 0.5;
    expect(json(t)).toBeNull();
    expect(readingsJson(t.engine, t.channel, t.ts, t.value, t.quality, 0, 1)).toBe('[[7,1,1780000000000,80,0,0,0]]');
  });
});
