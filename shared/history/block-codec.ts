/**
 * Lossless packing of one channel's readings over a span of time (a "block") into bytes. Pure code, no I/O.
 *
 * The scheme follows Pelkonen et al., "Gorilla: A Fast, Scalable, In-Memory Time Series Database",
 * VLDB 2015, section 4.1:
 * - timestamps: the first in full, then the first delta, then delta-of-deltas in the paper's buckets
 *   ('0' for 0; '10' + 7 bits for -63..64; '110' + 9 bits for -255..256; '1110' + 12 bits for -2047..2048;
 *   '1111' + the rest). Our timestamps are milliseconds, so the last bucket holds 52 bits, not 32.
 * - values: when every value of the block is exactly an integer divided by 10^k for one k in 0..6 (the
 *   simulator and most gateways send values rounded to a few decimals), the integers' successive differences
 *   in the same kind of buckets; otherwise the paper's XOR of successive float64 bit patterns ('0' same value;
 *   '10' meaningful bits inside the previous window; '11' + 5 bits of leading zeros + 6 bits of length + the bits).
 * - quality: run-length coded (value, length) pairs; a block is usually one run.
 *
 * decode(encode(x)) gives back the same timestamps, the same values bit for bit (-0 included; a NaN stays NaN,
 * its payload is not promised since JavaScript engines may canonicalise it) and the same qualities, in timestamp order. Timestamps must be safe integers, strictly increasing.
 */

export interface BlockReading {
  ts: number;
  value: number;
  quality: number;
}

const VERSION = 1;
const MODE_SCALED = 0;
const MODE_XOR = 1;
/** Largest |integer| the scaled mode stores: differences and their zigzag then stay exact doubles. */
const SCALED_LIMIT = 2 ** 50;
const POW10 = [1, 10, 100, 1000, 10_000, 100_000, 1_000_000];
const TWO32 = 4294967296;

class BitWriter {
  private buf = new Uint8Array(256);
  private bytes = 0;
  /** Bits used in the current (last) byte, 0..7. */
  private used = 0;

  /** Writes the low `n` bits of `v` (0 <= n <= 32, v >= 0), most significant first. */
  write(v: number, n: number): void {
    for (let i = n - 1; i >= 0; i--) this.bit(Math.floor(v / 2 ** i) & 1);
  }

  /** Writes a non-negative integer of up to 53 bits in `n` bits. */
  writeBig(v: number, n: number): void {
    if (n > 32) {
      this.write(Math.floor(v / TWO32), n - 32);
      this.write((v % TWO32) >>> 0, 32);
    } else this.write(v, n);
  }

  bit(b: number): void {
    if (this.used === 0) {
      if (this.bytes === this.buf.length) {
        const next = new Uint8Array(this.buf.length * 2);
        next.set(this.buf);
        this.buf = next;
      }
      this.buf[this.bytes++] = 0;
    }
    if (b) this.buf[this.bytes - 1] |= 0x80 >>> this.used;
    this.used = (this.used + 1) & 7;
  }

  bytesOut(): Uint8Array {
    return this.buf.slice(0, this.bytes);
  }
}

class BitReader {
  private pos = 0;
  constructor(private readonly buf: Uint8Array) {}

  bit(): number {
    const byte = this.pos >>> 3;
    if (byte >= this.buf.length) throw new Error('block: data ends early');
    const b = (this.buf[byte] >>> (7 - (this.pos & 7))) & 1;
    this.pos++;
    return b;
  }

  read(n: number): number {
    let v = 0;
    for (let i = 0; i < n; i++) v = v * 2 + this.bit();
    return v;
  }
}

const zigzag = (n: number): number => (n >= 0 ? n * 2 : -n * 2 - 1);
const unzigzag = (z: number): number => (z % 2 === 0 ? z / 2 : -(z + 1) / 2);

/** Buckets of the paper's timestamp coding: prefix length, value bits, range [lo, hi]. */
const TS_BUCKETS = [
  { bits: 7, lo: -63, hi: 64 },
  { bits: 9, lo: -255, hi: 256 },
  { bits: 12, lo: -2047, hi: 2048 },
] as const;
/** Bits of the final bucket: zigzag of a difference of two safe integers under 2^51 fits in 53 bits. */
const WIDE_BITS = 53;

/**
 * A signed integer in the paper's buckets: '0' for zero, '10' + 7 bits, '110' + 9 bits, '1110' + 12 bits,
 * '1111' + 53 bits (zigzag). Inside a bucket the value is stored as v - lo, so the paper's ranges hold exactly.
 */
function writeDod(w: BitWriter, v: number): void {
  if (v === 0) {
    w.bit(0);
    return;
  }
  for (let i = 0; i < TS_BUCKETS.length; i++) {
    const b = TS_BUCKETS[i];
    if (v >= b.lo && v <= b.hi) {
      for (let k = 0; k <= i; k++) w.bit(1);
      w.bit(0);
      w.write(v - b.lo, b.bits);
      return;
    }
  }
  for (let k = 0; k < 4; k++) w.bit(1);
  w.writeBig(zigzag(v), WIDE_BITS);
}

function readDod(r: BitReader): number {
  let ones = 0;
  while (ones < 4 && r.bit() === 1) ones++;
  if (ones === 0) return 0;
  if (ones < 4) {
    const b = TS_BUCKETS[ones - 1];
    return r.read(b.bits) + b.lo;
  }
  return unzigzag(r.read(WIDE_BITS));
}

/** Bits a delta-of-delta costs in the bucket coding (for tests and estimates). */
export function dodBits(v: number): number {
  if (v === 0) return 1;
  for (let i = 0; i < TS_BUCKETS.length; i++) if (v >= TS_BUCKETS[i].lo && v <= TS_BUCKETS[i].hi) return i + 2 + TS_BUCKETS[i].bits;
  return 4 + WIDE_BITS;
}

/** The smallest k (0..6) for which every value is exactly n / 10^k with |n| <= 2^50; null when none. */
function decimalScale(readings: readonly BlockReading[]): number | null {
  for (let k = 0; k < POW10.length; k++) {
    const f = POW10[k];
    let ok = true;
    for (const r of readings) {
      const n = Math.round(r.value * f) + 0; // + 0: -0 becomes 0, so a stored -0 fails the check below
      if (!(Math.abs(n) <= SCALED_LIMIT) || !Object.is(n / f, r.value)) {
        ok = false;
        break;
      }
    }
    if (ok) return k;
  }
  return null;
}

const F64 = new Float64Array(1);
const U32 = new Uint32Array(F64.buffer);
const HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;
const LO = 1 - HI;

/** clz of a 64-bit pattern given as two 32-bit words. */
const clz64 = (hi: number, lo: number) => (hi !== 0 ? Math.clz32(hi) : 32 + Math.clz32(lo));
/** Trailing zeros of a non-zero 64-bit pattern. */
function ctz64(hi: number, lo: number): number {
  if (lo !== 0) return 31 - Math.clz32(lo & -lo);
  return 32 + 31 - Math.clz32(hi & -hi);
}

/** Writes bits [from, from + n) of the 64-bit pattern (bit 0 = most significant). */
function writeBits64(w: BitWriter, hi: number, lo: number, from: number, n: number): void {
  for (let i = from; i < from + n; i++) w.bit(i < 32 ? (hi >>> (31 - i)) & 1 : (lo >>> (63 - i)) & 1);
}

function encodeXor(w: BitWriter, readings: readonly BlockReading[]): void {
  F64[0] = readings[0].value;
  let prevHi = U32[HI];
  let prevLo = U32[LO];
  w.write(prevHi, 32);
  w.write(prevLo, 32);
  let lead = -1;
  let trail = 0;
  for (let i = 1; i < readings.length; i++) {
    F64[0] = readings[i].value;
    const hi = U32[HI];
    const lo = U32[LO];
    const xHi = (hi ^ prevHi) >>> 0;
    const xLo = (lo ^ prevLo) >>> 0;
    prevHi = hi;
    prevLo = lo;
    if (xHi === 0 && xLo === 0) {
      w.bit(0);
      continue;
    }
    w.bit(1);
    // leading zeros capped at 31 (5 bits), as in the paper
    const l = Math.min(31, clz64(xHi, xLo));
    const t = ctz64(xHi, xLo);
    if (lead >= 0 && l >= lead && t >= trail) {
      w.bit(0);
      writeBits64(w, xHi, xLo, lead, 64 - lead - trail);
    } else {
      w.bit(1);
      const len = 64 - l - t; // 1..64, stored as len - 1 in 6 bits
      w.write(l, 5);
      w.write(len - 1, 6);
      writeBits64(w, xHi, xLo, l, len);
      lead = l;
      trail = t;
    }
  }
}

function decodeXor(r: BitReader, count: number): number[] {
  let hi = r.read(32);
  let lo = r.read(32);
  const out: number[] = new Array(count);
  const asDouble = () => {
    U32[HI] = hi;
    U32[LO] = lo;
    return F64[0];
  };
  out[0] = asDouble();
  let lead = 0;
  let len = 0;
  for (let i = 1; i < count; i++) {
    if (r.bit() === 1) {
      if (r.bit() === 1) {
        lead = r.read(5);
        len = r.read(6) + 1;
      }
      // xor the meaningful bits into place
      for (let b = lead; b < lead + len; b++) {
        if (r.bit()) {
          if (b < 32) hi = (hi ^ (1 << (31 - b))) >>> 0;
          else lo = (lo ^ (1 << (63 - b))) >>> 0;
        }
      }
    }
    out[i] = asDouble();
  }
  return out;
}

/** Writes a non-negative integer as a 7-bits-a-group varint (bytes aligned to the bit stream are not needed). */
function writeVar(w: BitWriter, v: number): void {
  let x = v;
  for (;;) {
    const low = x % 128;
    x = Math.floor(x / 128);
    w.write(low + (x > 0 ? 128 : 0), 8);
    if (x === 0) return;
  }
}

function readVar(r: BitReader): number {
  let v = 0;
  let mul = 1;
  for (let i = 0; i < 8; i++) {
    const b = r.read(8);
    v += (b & 127) * mul;
    mul *= 128;
    if (b < 128) return v;
  }
  throw new Error('block: bad length');
}

/** Packs readings (strictly increasing safe-integer timestamps) into one block. */
export function encodeBlock(readings: readonly BlockReading[]): Uint8Array {
  const n = readings.length;
  if (n === 0) throw new Error('block: no readings');
  for (let i = 0; i < n; i++) {
    const { ts, quality } = readings[i];
    if (!Number.isSafeInteger(ts) || Math.abs(ts) >= 2 ** 50) throw new Error(`block: timestamp ${ts} is not a whole number of ms under 2^50`);
    if (i > 0 && ts <= readings[i - 1].ts) throw new Error('block: timestamps must be strictly increasing');
    if (!Number.isSafeInteger(quality) || quality < 0 || quality > 0xffff) throw new Error(`block: quality ${quality} out of range`);
  }
  const w = new BitWriter();
  w.write(VERSION, 8);
  writeVar(w, n);
  const scale = decimalScale(readings);
  w.write(scale === null ? MODE_XOR : MODE_SCALED, 1);
  w.write(scale ?? 0, 3);
  // timestamps
  writeVar(w, zigzag(readings[0].ts));
  let prevDelta = 0;
  for (let i = 1; i < n; i++) {
    const delta = readings[i].ts - readings[i - 1].ts;
    writeDod(w, i === 1 ? delta : delta - prevDelta);
    prevDelta = delta;
  }
  // values
  if (scale === null) encodeXor(w, readings);
  else {
    const f = POW10[scale];
    let prev = Math.round(readings[0].value * f) + 0;
    w.writeBig(zigzag(prev), 52);
    for (let i = 1; i < n; i++) {
      const cur = Math.round(readings[i].value * f) + 0;
      writeDod(w, cur - prev);
      prev = cur;
    }
  }
  // quality: (value, run length) pairs
  let start = 0;
  for (let i = 1; i <= n; i++) {
    if (i === n || readings[i].quality !== readings[start].quality) {
      w.write(readings[start].quality, 16);
      writeVar(w, i - start);
      start = i;
    }
  }
  return w.bytesOut();
}

/** Unpacks a block made by encodeBlock. Throws on data it cannot read. */
export function decodeBlock(bytes: Uint8Array): BlockReading[] {
  const r = new BitReader(bytes);
  const version = r.read(8);
  if (version !== VERSION) throw new Error(`block: unknown version ${version}`);
  const n = readVar(r);
  const mode = r.read(1);
  const scale = r.read(3);
  if (scale >= POW10.length) throw new Error('block: bad scale');
  const ts: number[] = new Array(n);
  ts[0] = unzigzag(readVar(r));
  let delta = 0;
  for (let i = 1; i < n; i++) {
    const d = readDod(r);
    delta = i === 1 ? d : delta + d;
    ts[i] = ts[i - 1] + delta;
  }
  let values: number[];
  if (mode === MODE_XOR) values = decodeXor(r, n);
  else {
    const f = POW10[scale];
    values = new Array(n);
    let cur = unzigzag(r.read(52));
    values[0] = cur / f;
    for (let i = 1; i < n; i++) {
      cur += readDod(r);
      values[i] = cur / f;
    }
  }
  const out: BlockReading[] = new Array(n);
  let i = 0;
  while (i < n) {
    const q = r.read(16);
    const len = readVar(r);
    if (len === 0 || i + len > n) throw new Error('block: bad quality runs');
    for (const end = i + len; i < end; i++) out[i] = { ts: ts[i], value: values[i], quality: q };
  }
  return out;
}

/**
 * Merges readings into a block's: one reading per timestamp, in order. Where both hold a timestamp the one
 * already in the block is kept (a redelivered reading is stored once); `dropped` lists the others.
 */
export function mergeReadings(stored: readonly BlockReading[], incoming: readonly BlockReading[]): { merged: BlockReading[]; dropped: BlockReading[] } {
  const sortedIn = [...incoming].sort((a, b) => a.ts - b.ts);
  const merged: BlockReading[] = [];
  const dropped: BlockReading[] = [];
  let i = 0;
  let j = 0;
  while (i < stored.length || j < sortedIn.length) {
    if (j >= sortedIn.length || (i < stored.length && stored[i].ts < sortedIn[j].ts)) merged.push(stored[i++]);
    else if (i >= stored.length || sortedIn[j].ts < stored[i].ts) {
      const last = merged[merged.length - 1];
      if (last && last.ts === sortedIn[j].ts) dropped.push(sortedIn[j++]);
      else merged.push(sortedIn[j++]);
    } else dropped.push(sortedIn[j++]); // same timestamp: the stored one stays
  }
  return { merged, dropped };
}
