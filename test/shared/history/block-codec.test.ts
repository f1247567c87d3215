/** The history block codec: lossless round trips and the bit costs of Gorilla's timestamp coding. */
import { decodeBlock, dodBits, encodeBlock, mergeReadings, type BlockReading } from '../../../shared/history/block-codec';
import { EngineModel } from '../../../simulator/engine-model';
import { mulberry32 } from '../../../simulator/engine-model';

const bits = (v: number) => {
  const f = new Float64Array([v]);
  return Buffer.from(f.buffer).toString('hex');
};

/** Same timestamps, values bit for bit, qualities, in the same order. */
function expectSame(actual: BlockReading[], expected: BlockReading[]): void {
  expect(actual.length).toBe(expected.length);
  for (let i = 0; i < expected.length; i++) {
    if (actual[i].ts !== expected[i].ts || bits(actual[i].value) !== bits(expected[i].value) || actual[i].quality !== expected[i].quality) {
      throw new Error(
        `reading ${i}: got ${JSON.stringify(actual[i])} (${bits(actual[i].value)}), stored ${JSON.stringify(expected[i])} (${bits(expected[i].value)})`,
      );
    }
  }
}

const roundTrip = (readings: BlockReading[]) => {
  const bytes = encodeBlock(readings);
  expectSame(decodeBlock(bytes), readings);
  return bytes;
};

const HOUR = 3_600_000;
const T0 = Date.UTC(2026, 11, 1, 10);

describe('timestamp coding (Pelkonen et al., VLDB 2015, section 4.1.1)', () => {
  // The paper's buckets, quoted from memory: a delta-of-delta of 0 costs one bit '0'; -63..64 '10' + 7 bits;
  // -255..256 '110' + 9 bits; -2047..2048 '1110' + 12 bits; otherwise '1111' + 32 bits (we keep 53, for ms).
  it.each([
    [0, 1],
    [-2, 9],
    [64, 9],
    [-63, 9],
    [65, 12],
    [-255, 12],
    [256, 12],
    [257, 16],
    [-2047, 16],
    [2048, 16],
    [2049, 57],
  ])('a delta-of-delta of %d costs %d bits', (dod, cost) => {
    expect(dodBits(dod)).toBe(cost);
  });

  it("the paper's figure 2 example: 02:01:02, then one minute minus two seconds later, round-trips", () => {
    // from memory: points at 02:01:02 and 02:02:02 (delta 60 s) ... here in ms, with a -2 s jitter after
    const base = Date.UTC(2015, 2, 24, 2, 1, 2);
    roundTrip([
      { ts: base, value: 12, quality: 0 },
      { ts: base + 60_000, value: 12, quality: 0 },
      { ts: base + 118_000, value: 24, quality: 0 },
    ]);
  });

  it('regular 1 Hz readings cost about one bit each for their timestamps', () => {
    const readings = Array.from({ length: 3600 }, (_, i) => ({ ts: T0 + i * 1000, value: 7, quality: 0 }));
    const bytes = roundTrip(readings);
    // header + first timestamp + first delta + 3,598 one-bit dods + 3,599 one-bit unchanged values + one quality run
    expect(bytes.length).toBeLessThan(3600 / 4 + 40);
  });
});

describe('block codec round trips', () => {
  it('a single reading', () => {
    roundTrip([{ ts: T0, value: 81.25, quality: 0 }]);
    roundTrip([{ ts: 0, value: -0, quality: 1 }]);
  });

  it('extreme values: -0, NaN (JavaScript may canonicalise NaN payloads, so only NaN itself is promised), infinities, the largest and smallest doubles, subnormals, huge integers', () => {
    const weird = [-0, 0, NaN, Infinity, -Infinity, Number.MAX_VALUE, -Number.MAX_VALUE, Number.MIN_VALUE, 5e-324, 2 ** 53, -(2 ** 60), 1e-7, 0.1 + 0.2];
    roundTrip(weird.map((value, i) => ({ ts: T0 + i * 997, value, quality: i % 3 === 0 ? 1 : 0 })));
  });

  it('negative and far timestamps, big gaps and irregular timing', () => {
    roundTrip([
      { ts: -5_000_000, value: 1, quality: 0 },
      { ts: -1, value: 2, quality: 0 },
      { ts: 0, value: 3, quality: 0 },
      { ts: 2 ** 49, value: 4, quality: 0 },
    ]);
    const r = mulberry32(7);
    let ts = T0;
    const readings: BlockReading[] = [];
    for (let i = 0; i < 5000; i++) {
      ts += r() < 0.01 ? Math.floor(r() * HOUR) + 1 : 1000 + Math.floor(r() * 40) - 20;
      readings.push({ ts, value: Math.round(r() * 1e4) / 100, quality: r() < 0.05 ? 1 : 0 });
    }
    roundTrip(readings);
  });

  it('random blocks of every kind (seeded property test, 300 cases)', () => {
    for (let seed = 1; seed <= 300; seed++) {
      const r = mulberry32(seed);
      const n = 1 + Math.floor(r() * 400);
      const kind = seed % 4;
      let ts = Math.floor(r() * 2 ** 45) * (r() < 0.1 ? -1 : 1);
      const readings: BlockReading[] = [];
      let v = (r() - 0.5) * 1000;
      for (let i = 0; i < n; i++) {
        ts += 1 + Math.floor(r() < 0.2 ? r() * 1e7 : r() * 2000);
        v += (r() - 0.5) * 3;
        const value =
          kind === 0
            ? Math.round(v * 100) / 100 // two decimals, like the simulator
            : kind === 1
              ? Math.round(v) // whole numbers (speed)
              : kind === 2
                ? v // any double
                : [v, -0, NaN, 1e300, Math.round(v * 10) / 10][Math.floor(r() * 5)];
        readings.push({ ts, value, quality: r() < 0.1 ? 1 : 0 });
      }
      try {
        roundTrip(readings);
      } catch (err) {
        throw new Error(`seed ${seed}: ${(err as Error).message}`);
      }
    }
  });

  it("an hour of the simulator's five channels at 1 Hz round-trips in a few bytes a reading", () => {
    const model = new EngineModel({ engineId: 1, duty: 'standby', capacityL: 60, capPressureKpa: 100, heaterSetpointC: 40 }, { seed: 3, startMs: T0 - 1000 });
    model.setCommand('run');
    const series: Record<string, BlockReading[]> = {};
    for (let i = 0; i < 3600; i++) {
      const ts = T0 + i * 1000 + (i % 7 === 0 ? 3 : 0);
      const { sample } = model.step(ts);
      for (const [k, value] of Object.entries(sample.values)) (series[k] ??= []).push({ ts, value: value as number, quality: 0 });
    }
    let total = 0;
    for (const readings of Object.values(series)) total += roundTrip(readings).length;
    expect(total / (5 * 3600)).toBeLessThan(4);
  });

  it('refuses what it cannot store', () => {
    expect(() => encodeBlock([])).toThrow(/no readings/);
    expect(() =>
      encodeBlock([
        { ts: 2, value: 1, quality: 0 },
        { ts: 2, value: 1, quality: 0 },
      ]),
    ).toThrow(/increasing/);
    expect(() => encodeBlock([{ ts: 1.5, value: 1, quality: 0 }])).toThrow(/timestamp/);
    expect(() => decodeBlock(new Uint8Array([9]))).toThrow(/version/);
    const good = encodeBlock([{ ts: T0, value: 1.5, quality: 0 }]);
    expect(() => decodeBlock(good.slice(0, 3))).toThrow(/ends early/);
  });
});

describe('merging late and redelivered readings', () => {
  it('keeps one reading per timestamp, the stored one, in order', () => {
    const stored = [
      { ts: 10, value: 1, quality: 0 },
      { ts: 20, value: 2, quality: 0 },
      { ts: 30, value: 3, quality: 0 },
    ];
    const incoming = [
      { ts: 25, value: 9, quality: 1 },
      { ts: 20, value: 99, quality: 0 },
      { ts: 5, value: 0.5, quality: 0 },
      { ts: 40, value: 4, quality: 0 },
      { ts: 40, value: 44, quality: 0 },
    ];
    const { merged, dropped } = mergeReadings(stored, incoming);
    expect(merged).toEqual([
      { ts: 5, value: 0.5, quality: 0 },
      { ts: 10, value: 1, quality: 0 },
      { ts: 20, value: 2, quality: 0 },
      { ts: 25, value: 9, quality: 1 },
      { ts: 30, value: 3, quality: 0 },
      { ts: 40, value: 4, quality: 0 },
    ]);
    expect(dropped).toEqual([
      { ts: 20, value: 99, quality: 0 },
      { ts: 40, value: 44, quality: 0 },
    ]);
  });
});
