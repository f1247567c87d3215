/**
 * Several servers: every batch of readings one server accepted goes to the others (socket.io server-side
 * events through the PostgreSQL adapter), so each server has the whole fleet's live state, pushes every
 * reading to its own browsers, and the server owning an engine's lease evaluates all of that engine's
 * readings whichever server took them from the broker. Readings travel as one flat array
 * [engine, channel code, ts, value, quality, ...], gathered for at most RELAY_WINDOW_MS (or RELAY_MAX_READINGS)
 * so a message stays under PostgreSQL's 8000-byte NOTIFY payload in the common case.
 */
import type { Server } from 'socket.io';
import { channelByCode, CHANNELS } from '../../shared/channels';
import type { Logger } from '../logger';
import type { AcceptedReading } from '../telemetry/types';

export const RELAY_EVENT = 'jw:readings';
const RELAY_WINDOW_MS = 20;
const RELAY_MAX_READINGS = 180;

export interface RelayCounters {
  sentReadings: number;
  sentMessages: number;
  receivedReadings: number;
  badMessages: number;
}

export class ReadingRelay {
  private flat: number[] = [];
  private timer: NodeJS.Timeout | null = null;
  readonly counters: RelayCounters = { sentReadings: 0, sentMessages: 0, receivedReadings: 0, badMessages: 0 };

  constructor(
    private readonly io: Server,
    private readonly log: Logger,
    onPeerReadings: (batch: AcceptedReading[]) => void,
  ) {
    io.on(RELAY_EVENT, (flat: unknown) => {
      const batch = decode(flat);
      if (!batch) {
        this.counters.badMessages++;
        this.log.warn('reading relay: a message from another server was not a readings array (ignored)');
        return;
      }
      this.counters.receivedReadings += batch.length;
      if (batch.length) onPeerReadings(batch);
    });
  }

  /** A batch this server accepted: on to the other servers. */
  send(batch: AcceptedReading[]): void {
    for (const r of batch) {
      this.flat.push(r.engineId, CHANNELS[r.channel].code, r.ts, r.value, r.quality);
      if (this.flat.length >= RELAY_MAX_READINGS * 5) this.flush();
    }
    if (this.flat.length && !this.timer) this.timer = setTimeout(() => this.flush(), RELAY_WINDOW_MS);
  }

  flush(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    if (!this.flat.length) return;
    const flat = this.flat;
    this.flat = [];
    this.counters.sentReadings += flat.length / 5;
    this.counters.sentMessages++;
    this.io.serverSideEmit(RELAY_EVENT, flat);
  }

  close(): void {
    this.flush();
  }
}

/** The flat array back to readings; null when it is not one. */
export function decode(flat: unknown): AcceptedReading[] | null {
  if (!Array.isArray(flat) || flat.length % 5 !== 0) return null;
  const out: AcceptedReading[] = new Array(flat.length / 5);
  for (let i = 0, j = 0; i < flat.length; i += 5, j++) {
    const [engineId, code, ts, value, quality] = [flat[i], flat[i + 1], flat[i + 2], flat[i + 3], flat[i + 4]];
    const ch = typeof code === 'number' ? channelByCode(code) : undefined;
    if (!Number.isInteger(engineId) || !ch || !Number.isFinite(ts) || !Number.isFinite(value) || (quality !== 0 && quality !== 1)) return null;
    out[j] = { engineId, channel: ch.key, ts, value, quality };
  }
  return out;
}
