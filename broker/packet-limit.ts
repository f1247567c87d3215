/**
 * A packet-size limit enforced on the raw byte stream, before aedes sees it.
 *
 * aedes 1.2 has no maximum packet size: its parser (mqtt-packet) collects the bytes of a packet until
 * the length its fixed header declares has arrived, so a client that declares 200 MB and keeps sending
 * makes the broker hold all of it, before authentication too. Here every packet's fixed header
 * (type byte + "remaining length", 1-4 bytes of 7 bits, MQTT 3.1.1 section 2.2.3 / MQTT 5 section 1.5.5)
 * is read as the bytes pass; a declared length above the limit closes the connection at once.
 */
import type net from 'node:net';

export interface PacketLimits {
  /** The first packet (CONNECT: client id, will, username, password). */
  connectBytes: number;
  /** Every later packet (a PUBLISH: payload limit plus room for the topic and properties). */
  packetBytes: number;
}

/** Follows packet boundaries across chunks; `feed` returns the declared size of an over-limit packet, else -1. */
export class PacketSizeGuard {
  /** Fixed headers read completely so far. */
  packets = 0;
  private skip = 0;
  private inHeader = false;
  private length = 0;
  private multiplier = 1;
  private lengthBytes = 0;

  constructor(private readonly limits: PacketLimits) {}

  feed(buf: Uint8Array): number {
    let i = 0;
    while (i < buf.length) {
      if (this.skip > 0) {
        const k = Math.min(this.skip, buf.length - i);
        this.skip -= k;
        i += k;
        continue;
      }
      if (!this.inHeader) {
        this.inHeader = true; // the type-and-flags byte
        this.length = 0;
        this.multiplier = 1;
        this.lengthBytes = 0;
        i++;
        continue;
      }
      const b = buf[i++];
      this.length += (b & 0x7f) * this.multiplier;
      this.multiplier *= 128;
      this.lengthBytes++;
      const limit = this.packets === 0 ? this.limits.connectBytes : this.limits.packetBytes;
      // too long already (even before the last length byte), or a malformed 5th length byte
      if (this.length > limit || (this.lengthBytes === 4 && b & 0x80)) return Math.max(this.length, limit + 1);
      if ((b & 0x80) === 0) {
        this.inHeader = false;
        this.skip = this.length;
        this.packets++;
      }
    }
    return -1;
  }
}

/**
 * Watches what aedes reads from `socket` (it pulls with socket.read() on 'readable') and destroys the
 * socket, handing aedes nothing more, when a packet declares more than the limit.
 */
export function limitPacketSize(socket: net.Socket, limits: PacketLimits, onOversize: (declaredBytes: number, firstPacket: boolean) => void): void {
  const guard = new PacketSizeGuard(limits);
  const read = socket.read.bind(socket);
  socket.read = ((size?: number) => {
    const chunk = read(size) as Buffer | string | null;
    if (chunk === null || socket.destroyed) return socket.destroyed ? null : chunk;
    const declared = guard.feed(typeof chunk === 'string' ? Buffer.from(chunk) : chunk);
    if (declared >= 0) {
      socket.destroy();
      onOversize(declared, guard.packets === 0);
      return null;
    }
    return chunk;
  }) as typeof socket.read;
}
