/**
 * The broker's packet-size guard on the raw byte stream. Remaining-length encoding: MQTT 3.1.1 section
 * 2.2.3 (1-4 bytes, 7 bits each, low group first; 0x80 = more bytes follow), same in MQTT 5 section 1.5.5.
 * The broker itself is tested on a real port in broker.test.ts.
 */
import { PacketSizeGuard } from '../../broker/packet-limit';

const LIMITS = { connectBytes: 100, packetBytes: 1000 };
const varint = (n: number): number[] => {
  const out: number[] = [];
  do {
    let b = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) b |= 0x80;
    out.push(b);
  } while (n > 0);
  return out;
};
const packet = (type: number, length: number) => Buffer.from([type, ...varint(length), ...Array(length).fill(0x41)]);

test('remaining-length examples of the specification: 127 = 0x7F, 128 = 0x80 0x01, 16,383 = 0xFF 0x7F, 268,435,455 = 0xFF 0xFF 0xFF 0x7F', () => {
  expect(varint(127)).toEqual([0x7f]);
  expect(varint(128)).toEqual([0x80, 0x01]);
  expect(varint(16_383)).toEqual([0xff, 0x7f]);
  expect(varint(268_435_455)).toEqual([0xff, 0xff, 0xff, 0x7f]);
});

test('packets within the limits pass, whole or split at every byte', () => {
  const stream = Buffer.concat([packet(0x10, 100), packet(0x32, 1000), packet(0xc0, 0), packet(0x30, 200)]);
  expect(new PacketSizeGuard(LIMITS).feed(stream)).toBe(-1);
  const g = new PacketSizeGuard(LIMITS);
  for (let i = 0; i < stream.length; i++) expect(g.feed(stream.subarray(i, i + 1))).toBe(-1);
  expect(g.packets).toBe(4);
});

test('a CONNECT over its limit is caught at its header, before the body arrives', () => {
  expect(new PacketSizeGuard(LIMITS).feed(Buffer.from([0x10, ...varint(101)]))).toBe(101);
  // 200 MiB declared: caught after the length bytes that already exceed the limit
  const declared = 200 * 1024 * 1024;
  expect(new PacketSizeGuard(LIMITS).feed(Buffer.from([0x10, ...varint(declared)]))).toBeGreaterThan(100);
});

test('a later packet over the packet limit is caught, one within it passes', () => {
  const g = new PacketSizeGuard(LIMITS);
  expect(g.feed(packet(0x10, 50))).toBe(-1);
  expect(g.feed(packet(0x30, 1000))).toBe(-1);
  expect(g.feed(Buffer.from([0x30, ...varint(1001)]))).toBe(1001);
});

test('a malformed length (a fifth length byte) is refused', () => {
  const g = new PacketSizeGuard({ connectBytes: 1e9, packetBytes: 1e9 });
  expect(g.feed(Buffer.from([0x10, 0x80, 0x80, 0x80, 0x80]))).toBeGreaterThan(0);
});
