/**
 * JSON shapes of the socket.io live push (server/realtime/live-push.ts), shared by server and client. Types only.
 */
import type { ChannelKey } from '../channels';

/** Latest value of one channel in a live message (SI units; quality 0 good, 1 bad; ts in ms since the epoch). */
export interface LiveValue {
  value: number;
  ts: number;
  quality: 0 | 1;
}

export type LiveValues = Partial<Record<ChannelKey, LiveValue>>;

/**
 * One engine's latest values: the socket.io `readings` event (to engine pages, and a gateway's `lost`), and each
 * entry of a `readings-batch`.
 */
export interface LiveReadings {
  engineId: number;
  /** null when the engine's site could not be looked up. */
  siteId: number | null;
  /** The newest sample time among `values`. */
  ts: number;
  values: LiveValues;
  /** A gateway declared the engine's data lost (Sparkplug death): the values are the last ones, now bad quality. */
  lost?: true;
}

/**
 * socket.io `readings-batch`: to a socket watching the fleet or sites, once per interval (50 ms), every engine
 * of its scope whose values changed in that interval (each engine once, its latest value per channel).
 */
export interface LiveReadingsBatch {
  engines: LiveReadings[];
}

/** socket.io event names of the live readings. */
export const READINGS_EVENT = 'readings';
export const READINGS_BATCH_EVENT = 'readings-batch';
