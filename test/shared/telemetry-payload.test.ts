import { MAX_PAYLOAD_BYTES, MAX_SAMPLES, parseTelemetry } from '../../shared/telemetry-payload';

const NOW = Date.parse('2026-12-02T01:00:00.000Z');
const buf = (x: unknown) => Buffer.from(typeof x === 'string' ? x : JSON.stringify(x));
const reasons = (r: ReturnType<typeof parseTelemetry>) => r.rejects.map((x) => x.reason);

describe('parseTelemetry: accepted forms', () => {
  test('single form with epoch-millisecond ts', () => {
    const r = parseTelemetry(7, buf({ ts: NOW, values: { coolant_temp: 82.4, coolant_pressure: 96.5, engine_speed: 1800 } }), NOW);
    expect(r.rejects).toEqual([]);
    expect(r.accepted).toEqual([
      { channel: 'coolant_temp', ts: NOW, value: 82.4, quality: 0, outOfRange: false },
      { channel: 'coolant_pressure', ts: NOW, value: 96.5, quality: 0, outOfRange: false },
      { channel: 'engine_speed', ts: NOW, value: 1800, quality: 0, outOfRange: false },
    ]);
  });

  test('samples form with ISO 8601 ts (Z and offset)', () => {
    const r = parseTelemetry(
      7,
      buf({
        samples: [
          { ts: '2026-12-02T00:59:00.000Z', values: { coolant_temp: 81.9 } },
          { ts: '2026-12-02T02:59:30+02:00', values: { ambient_temp: 12 } },
        ],
      }),
      NOW,
    );
    expect(r.rejects).toEqual([]);
    expect(r.accepted.map((a) => [a.channel, a.ts, a.value])).toEqual([
      ['coolant_temp', NOW - 60_000, 81.9],
      ['ambient_temp', NOW - 30_000, 12],
    ]);
  });

  test('many samples fit in 16 KiB; more than 500 samples are a schema reject', () => {
    const sample = { ts: NOW, values: { coolant_temp: 80 } };
    expect(parseTelemetry(1, buf({ samples: Array(300).fill(sample) }), NOW).accepted).toHaveLength(300);
    const over = parseTelemetry(1, buf({ samples: Array(501).fill({}) }), NOW);
    expect(over.accepted).toHaveLength(0);
    expect(reasons(over)).toEqual(['schema']);
  });
});

describe('parseTelemetry: unit conversion on arrival', () => {
  // Conversion factors from NIST SP 811 (2008 edition), Appendix B:
  //   t/°C = (t/°F - 32)/1.8 and t/°C = T/K - 273.15 (B.9, temperature);
  //   1 psi (lbf/in²) = 6.894 757 E+03 Pa; 1 bar = 1.0 E+05 Pa (B.8);
  //   1 mS = 1000 µS by the SI prefixes (Table 5).
  const one = (channel: string, value: number, unit: string) => {
    const r = parseTelemetry(1, buf({ ts: NOW, values: { [channel]: { value, unit } } }), NOW);
    expect(r.rejects).toEqual([]);
    return r.accepted[0].value;
  };
  test('degF: 180.5 °F = 82.5 °C; 212 °F = 100 °C; -40 °F = -40 °C', () => {
    expect(one('coolant_temp', 180.5, 'degF')).toBeCloseTo((180.5 - 32) / 1.8, 10);
    expect(one('coolant_temp', 180.5, 'degF')).toBeCloseTo(82.5, 10);
    expect(one('coolant_temp', 212, 'degF')).toBeCloseTo(100, 10);
    expect(one('ambient_temp', -40, 'degF')).toBeCloseTo(-40, 10);
  });
  test('K: 355.65 K = 82.5 °C', () => {
    expect(one('coolant_temp', 355.65, 'K')).toBeCloseTo(82.5, 10);
  });
  test('psi: 15 psi = 15 x 6.894757 kPa (NIST factor to 7 digits)', () => {
    expect(one('coolant_pressure', 15, 'psi')).toBeCloseTo(15 * 6.894757, 4);
    expect(one('coolant_pressure', 1, 'psi')).toBeCloseTo(6.894757, 6);
  });
  test('bar: 1.2 bar = 120 kPa', () => {
    expect(one('coolant_pressure', 1.2, 'bar')).toBeCloseTo(120, 10);
  });
  test('mS/cm: 2.5 mS/cm = 2500 µS/cm', () => {
    expect(one('coolant_conductivity', 2.5, 'mS/cm')).toBeCloseTo(2500, 10);
  });
  test('stored unit named explicitly is taken as is', () => {
    expect(one('engine_speed', 1500, 'rpm')).toBe(1500);
    expect(one('coolant_temp', 90, 'degC')).toBe(90);
  });
});

describe('parseTelemetry: every reject reason', () => {
  test('not_json', () => {
    expect(reasons(parseTelemetry(1, buf('{"ts": 1, values'), NOW))).toEqual(['not_json']);
    expect(reasons(parseTelemetry(1, Buffer.from([0xff, 0xfe, 0x00]), NOW))).toEqual(['not_json']);
  });
  test('too_large: more than MAX_PAYLOAD_BYTES, checked before parsing', () => {
    const big = buf({ ts: NOW, values: { coolant_temp: 80 }, pad: 'x'.repeat(MAX_PAYLOAD_BYTES) });
    const r = parseTelemetry(1, big, NOW);
    expect(reasons(r)).toEqual(['too_large']);
    expect(r.accepted).toEqual([]);
  });
  test('byte-limit edge: exactly MAX_PAYLOAD_BYTES is parsed, one byte more is too_large', () => {
    const one = (pad: number) => JSON.stringify({ ts: NOW, values: { coolant_temp: 80 }, pad: 'x'.repeat(pad) });
    const at = one(MAX_PAYLOAD_BYTES - one(0).length);
    expect(Buffer.byteLength(at)).toBe(MAX_PAYLOAD_BYTES);
    expect(parseTelemetry(1, buf(at), NOW).accepted).toHaveLength(1);
    expect(reasons(parseTelemetry(1, buf(at.replace('"pad":"', '"pad":"x')), NOW))).toEqual(['too_large']);
  });
  test('the sample limit fits the byte limit: MAX_SAMPLES samples, five channels in { value, unit } form, ISO timestamps', () => {
    const v = (x: number, unit: string) => ({ value: x + 0.1234567890123, unit });
    const samples = Array.from({ length: MAX_SAMPLES }, (_, i) => ({
      ts: new Date(NOW - 600_000 + i * 1000).toISOString().replace('Z', '000000+00:00'),
      values: {
        coolant_temp: v(80, 'degC'),
        coolant_pressure: v(95, 'kPa'),
        coolant_conductivity: v(2400, 'uS/cm'),
        engine_speed: v(1800, 'rpm'),
        ambient_temp: v(20, 'degC'),
      },
    }));
    const payload = buf({ samples });
    expect(payload.byteLength).toBeLessThanOrEqual(MAX_PAYLOAD_BYTES);
    const r = parseTelemetry(1, payload, NOW);
    expect(r.rejects).toEqual([]);
    expect(r.accepted).toHaveLength(MAX_SAMPLES * 5);
    // one sample more is refused by the sample limit, not the byte limit
    expect(reasons(parseTelemetry(1, buf({ samples: [...samples, samples[0]] }), NOW))).toEqual(['schema']);
  });
  test('schema: wrong shapes', () => {
    for (const bad of [42, '"text"', null, [], {}, { ts: NOW }, { values: { coolant_temp: 1 } }, { samples: [] }, { samples: 'x' }]) {
      expect(reasons(parseTelemetry(1, buf(bad), NOW))).toEqual(['schema']);
    }
  });
  test('schema: bad timestamp formats and bad value shapes', () => {
    expect(reasons(parseTelemetry(1, buf({ ts: 'yesterday', values: { coolant_temp: 1 } }), NOW))).toEqual(['schema']);
    expect(reasons(parseTelemetry(1, buf({ ts: '2026-12-02 01:00', values: { coolant_temp: 1 } }), NOW))).toEqual(['schema']);
    expect(reasons(parseTelemetry(1, buf({ ts: -5, values: { coolant_temp: 1 } }), NOW))).toEqual(['schema']);
    expect(reasons(parseTelemetry(1, buf({ ts: NOW, values: { coolant_temp: '80' } }), NOW))).toEqual(['schema']);
    expect(reasons(parseTelemetry(1, buf({ ts: NOW, values: { coolant_temp: { value: '80', unit: 'degC' } } }), NOW))).toEqual(['schema']);
    expect(reasons(parseTelemetry(1, buf({ ts: NOW, values: {} }), NOW))).toEqual(['schema']);
  });
  test('not_finite: 1e999 parses to Infinity', () => {
    const r = parseTelemetry(1, buf('{"ts": ' + NOW + ', "values": {"coolant_temp": 1e999, "engine_speed": {"value": -1e999, "unit": "rpm"}}}'), NOW);
    expect(reasons(r)).toEqual(['not_finite', 'not_finite']);
  });
  test('future_timestamp: more than 5 minutes ahead; 5 minutes exactly is fine', () => {
    expect(reasons(parseTelemetry(1, buf({ ts: NOW + 5 * 60_000 + 1, values: { coolant_temp: 80 } }), NOW))).toEqual(['future_timestamp']);
    expect(parseTelemetry(1, buf({ ts: NOW + 5 * 60_000, values: { coolant_temp: 80 } }), NOW).accepted).toHaveLength(1);
  });
  test('old_timestamp: older than 31 days', () => {
    const day = 86_400_000;
    expect(reasons(parseTelemetry(1, buf({ ts: NOW - 31 * day - 1, values: { coolant_temp: 80 } }), NOW))).toEqual(['old_timestamp']);
    expect(parseTelemetry(1, buf({ ts: NOW - 30 * day, values: { coolant_temp: 80 } }), NOW).accepted).toHaveLength(1);
  });
  test('unknown_channel', () => {
    const r = parseTelemetry(1, buf({ ts: NOW, values: { oil_temp: 90 } }), NOW);
    expect(reasons(r)).toEqual(['unknown_channel']);
    expect(r.rejects[0].detail).toContain('oil_temp');
  });
  test('bad_unit: unit of another quantity or unknown', () => {
    const r = parseTelemetry(1, buf({ ts: NOW, values: { coolant_temp: { value: 14, unit: 'psi' }, coolant_pressure: { value: 1, unit: 'atm' } } }), NOW);
    expect(reasons(r)).toEqual(['bad_unit', 'bad_unit']);
  });
});

describe('parseTelemetry: out of range and mixed payloads', () => {
  test('out-of-range values are kept with quality 1 and flagged; the range edges are good', () => {
    const r = parseTelemetry(1, buf({ ts: NOW, values: { coolant_temp: 150, coolant_pressure: 1000.1, engine_speed: -1, coolant_conductivity: 0 } }), NOW);
    expect(r.rejects).toEqual([]);
    expect(r.accepted.map((a) => [a.channel, a.quality, a.outOfRange])).toEqual([
      ['coolant_temp', 0, false],
      ['coolant_pressure', 1, true],
      ['engine_speed', 1, true],
      ['coolant_conductivity', 0, false],
    ]);
  });
  test('range is judged after conversion: 320 °F = 160 °C is out of range', () => {
    const r = parseTelemetry(1, buf({ ts: NOW, values: { coolant_temp: { value: 320, unit: 'degF' } } }), NOW);
    expect(r.accepted[0]).toMatchObject({ quality: 1, outOfRange: true });
    expect(r.accepted[0].value).toBeCloseTo(160, 10);
  });
  test('one bad value or sample rejects only itself', () => {
    const r = parseTelemetry(
      3,
      buf({
        samples: [
          { ts: NOW - 2000, values: { coolant_temp: 80, oil_temp: 1, coolant_pressure: { value: 14, unit: 'degF' } } },
          { ts: NOW + 3_600_000, values: { coolant_temp: 81 } },
          { ts: 'garbage', values: { coolant_temp: 82 } },
          'not a sample',
          { ts: NOW - 1000, values: { coolant_temp: { value: 180.5, unit: 'degF' }, engine_speed: 5000 } },
          { ts: NOW - 3_000_000_000, values: { coolant_temp: 83 } },
        ],
      }),
      NOW,
    );
    expect(reasons(r)).toEqual(['unknown_channel', 'bad_unit', 'future_timestamp', 'schema', 'schema', 'old_timestamp']);
    expect(r.accepted.map((a) => [a.channel, a.ts, Math.round(a.value * 10) / 10, a.quality])).toEqual([
      ['coolant_temp', NOW - 2000, 80, 0],
      ['coolant_temp', NOW - 1000, 82.5, 0],
      ['engine_speed', NOW - 1000, 5000, 1],
    ]);
    expect(r.rejects[3].detail).toContain('samples[2].ts');
    expect(r.rejects[4].detail).toContain('samples[3]');
  });
});
