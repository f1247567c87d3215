import { ChannelKey } from '../../../shared/channels';

/** Latest value of one channel as the API and the live push send it (SI units, quality 0 good / 1 bad). */
export interface ChannelValue {
  value: number;
  ts: number | string;
  quality: number;
}

export type ChannelValues = Partial<Record<ChannelKey, ChannelValue>>;

/** One engine's live values: a `readings` event, or one entry of a `readings-batch` (shared/api/live-view.ts). */
export type { LiveReadings, LiveReadingsBatch } from '../../../shared/api/live-view';

/** What a screen wants pushed to it (socket.io `watch`). */
export interface WatchRequest {
  fleet?: true;
  /** Alarm events of the whole fleet (room `alarms`), without any readings. */
  alarms?: true;
  siteIds?: number[];
  engineIds?: number[];
}

export type LiveConnection = 'offline' | 'connecting' | 'connected' | 'refused';

/** socket.io `alarm` event: one alarm changed (the alarms feature reads the full shape). */
export interface LiveAlarmMessage {
  id: number;
  engineId: number;
  [field: string]: unknown;
}
