/** Pure Sparkplug B pieces: topics, value reading by data type, name mapping and unit conversion. */
import { checkMetricValue, mapMetric, isSparkplugControlMetric } from '../../shared/sparkplug/channels';
import { decodeSparkplugPayload, metricValue } from '../../shared/sparkplug/payload';
import { DataType } from '../../shared/sparkplug/schema';
import { parseSparkplugTopic, sparkplugTopic } from '../../shared/sparkplug/topic';
import { lostNoData, stepNoData } from '../../shared/rules/no-data-rule';

test('topics: node and device messages parse; other levels and STATE do not', () => {
  expect(parseSparkplugTopic('spBv1.0/Plant A/NDATA/gw-1')).toEqual({ groupId: 'Plant A', type: 'NDATA', edgeNodeId: 'gw-1', deviceId: null });
  expect(parseSparkplugTopic('spBv1.0/G/DBIRTH/N/D')).toEqual({ groupId: 'G', type: 'DBIRTH', edgeNodeId: 'N', deviceId: 'D' });
  expect(parseSparkplugTopic('spBv1.0/G/DDATA/N')).toBeNull(); // device type without a device
  expect(parseSparkplugTopic('spBv1.0/G/NDATA/N/D')).toBeNull();
  expect(parseSparkplugTopic('spBv1.0/STATE/host')).toBeNull();
  expect(parseSparkplugTopic('spBv1.0/G/NBIRTH/+')).toBeNull();
  expect(sparkplugTopic('G', 'NCMD', 'N')).toBe('spBv1.0/G/NCMD/N');
});

test("values are read by the data type of the birth (Sparkplug 3.0: signed integers as two's complement in the unsigned field)", () => {
  // from memory of the specification's encoding rules; checked against JavaScript's own two's complement
  expect(metricValue({ field: 'int_value', value: 0xff }, DataType.Int8)).toEqual({ kind: 'number', value: -1 });
  expect(metricValue({ field: 'int_value', value: 0xfff6 }, DataType.Int16)).toEqual({ kind: 'number', value: -10 });
  expect(metricValue({ field: 'int_value', value: 0xfffffffb }, DataType.Int32)).toEqual({ kind: 'number', value: -5 });
  expect(metricValue({ field: 'int_value', value: 0xfffffffb }, DataType.UInt32)).toEqual({ kind: 'number', value: 4294967291 });
  expect(metricValue({ field: 'long_value', value: '18446744073709551615' }, DataType.Int64)).toEqual({ kind: 'number', value: -1 });
  expect(metricValue({ field: 'long_value', value: '1800' }, DataType.UInt64)).toEqual({ kind: 'number', value: 1800 });
  expect(metricValue({ field: 'boolean_value', value: true }, DataType.Boolean)).toEqual({ kind: 'boolean', value: true });
  expect(metricValue({ field: null, value: null }, DataType.Double)).toEqual({ kind: 'null' });
});

test('bad bytes are a counted decode failure, not an exception', () => {
  const r = decodeSparkplugPayload(Buffer.from('{"ts": 1, "values": {}}'));
  expect(r.ok).toBe(false);
  if (!r.ok) expect(r.reason).toBe('sparkplug_decode');
  const big = decodeSparkplugPayload(new Uint8Array(65 * 1024));
  expect(!big.ok && big.reason).toBe('too_large');
});

test('names map to channels by key or by the device table; units convert as for JSON payloads', () => {
  expect(mapMetric('coolant_temp', null)).toEqual({ channel: 'coolant_temp', unit: null });
  expect(mapMetric('Engine/Coolant/Temp', null)).toBeNull();
  expect(mapMetric('Engine/Coolant/Temp', { 'Engine/Coolant/Temp': { channel: 'coolant_temp', unit: 'degF' } })).toEqual({
    channel: 'coolant_temp',
    unit: 'degF',
  });
  expect(isSparkplugControlMetric('Node Control/Rebirth')).toBe(true);
  expect(isSparkplugControlMetric('bdSeq')).toBe(true);
  const now = Date.UTC(2026, 11, 2);
  const f = checkMetricValue('coolant_temp', 212, '°F', now, now);
  expect(f.ok && f.reading.value).toBeCloseTo(100, 9); // NIST SP 811 B.9: t/°C = (t/°F - 32) / 1.8
  const p = checkMetricValue('coolant_pressure', 1, 'psi', now, now);
  expect(p.ok && p.reading.value).toBeCloseTo(6.894757, 6); // NIST SP 811 B.8: 1 psi = 6.894 757 kPa
  expect(checkMetricValue('coolant_pressure', 1, 'degC', now, now)).toMatchObject({ ok: false, reason: 'bad_unit' });
  expect(checkMetricValue('coolant_temp', Number.NaN, null, now, now)).toMatchObject({ ok: false, reason: 'not_finite' });
  expect(checkMetricValue('coolant_temp', 80, null, now + 3_600_000, now)).toMatchObject({ ok: false, reason: 'future_timestamp' });
  const hot = checkMetricValue('coolant_temp', 400, null, now, now);
  expect(hot.ok && hot.reading).toMatchObject({ quality: 1, outOfRange: true });
});

test('a death certificate raises the no-data rule at once; the next reading clears it (common practice, no published source)', () => {
  const params = { factor: 3, minSilenceS: 60, label: 'Engine data' };
  const s0 = { lastTs: 1000, intervalsMs: [1000, 1000, 1000], active: false };
  const lost = lostNoData(s0, 1500, params);
  expect(lost.events).toEqual([{ kind: 'raise', ts: 1500, value: null, message: 'Engine data: the gateway reported its data lost' }]);
  expect(lostNoData(lost.state, 1600, params).events).toEqual([]); // once
  const back = stepNoData(lost.state, { ts: 9000, value: 80, quality: 0 }, params);
  expect(back.events.map((e) => e.kind)).toEqual(['clear']);
  expect(back.state.intervalsMs).toEqual([1000, 1000, 1000]); // the outage is not learned as an interval
});
