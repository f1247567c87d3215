/**
 * Batches the gateway sends after an outage or as history keep to the MQTT contract of
 * DEVELOPERS.md: at most 500 samples and 16 KiB per payload, oldest first, nothing skipped.
 * Pure: no broker is involved.
 */
import { buildBatch, MAX_BATCH_SAMPLES, MAX_PAYLOAD_BYTES, singlePayload } from '../../simulator/gateway';
import { EngineModel, Sample } from '../../simulator/engine-model';

function samples(n: number, channels = 5): Sample[] {
  const m = new EngineModel({ engineId: 1, duty: 'continuous', capacityL: 100, capPressureKpa: 103, heaterSetpointC: null }, { seed: 1, startMs: 0 });
  return Array.from({ length: n }, (_, i) => {
    const s = m.step(1_764_640_800_000 + i * 1000);
    const keys = Object.keys(s.sample.values).slice(0, channels) as (keyof Sample['values'])[];
    return { ts: s.sample.ts, values: Object.fromEntries(keys.map((k) => [k, s.sample.values[k]])) as Sample['values'] };
  });
}

function drain(all: Sample[]): { payload: string; count: number }[] {
  const out = [];
  let head = 0;
  const view = {
    get length() {
      return all.length - head;
    },
    at: (i: number) => all[head + i],
  };
  while (view.length > 0) {
    const b = buildBatch(view);
    out.push(b);
    head += b.count;
  }
  return out;
}

test('five-channel samples: each batch within 16 KiB and 500 samples, all samples in order', () => {
  const all = samples(2000);
  const batches = drain(all);
  const seen: number[] = [];
  for (const b of batches) {
    expect(Buffer.byteLength(b.payload)).toBeLessThanOrEqual(MAX_PAYLOAD_BYTES);
    expect(b.count).toBeLessThanOrEqual(MAX_BATCH_SAMPLES);
    const parsed = JSON.parse(b.payload) as { samples: Sample[] };
    expect(parsed.samples).toHaveLength(b.count);
    seen.push(...parsed.samples.map((s) => s.ts));
  }
  expect(seen).toEqual(all.map((s) => s.ts));
  expect(batches.length).toBeGreaterThan(4); // 16 KiB holds roughly a hundred five-channel samples
});

test('small samples: the 500-sample limit applies before the size limit', () => {
  // Real samples never get there (one channel with an epoch-ms timestamp is ~53 bytes: ~300 a batch).
  const tiny = Array.from({ length: 1200 }, (_, i) => ({ ts: i, values: {} }) as unknown as Sample);
  const batches = drain(tiny);
  expect(batches.map((b) => b.count)).toEqual([500, 500, 200]);
  for (const b of batches) expect(Buffer.byteLength(b.payload)).toBeLessThanOrEqual(MAX_PAYLOAD_BYTES);
});

test('the single-sample payload has the contract shape', () => {
  const [s] = samples(1);
  const p = JSON.parse(singlePayload(s));
  expect(Object.keys(p)).toEqual(['ts', 'values']);
  expect(Object.keys(p.values).sort()).toEqual(['ambient_temp', 'coolant_conductivity', 'coolant_pressure', 'coolant_temp', 'engine_speed']);
});
