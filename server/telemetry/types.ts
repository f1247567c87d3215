import type http from 'node:http';
import type { Sequelize } from 'sequelize';
import type { ServerOptions } from 'socket.io';
import type { ChannelKey } from '../../shared/channels';
import type { AccessEvents } from '../auth/access-events';
import type { Config } from '../config';
import type { Logger } from '../logger';

/** The latest value of one channel as the live state knows it. */
export interface LatestValue {
  value: number;
  ts: number;
  quality: 0 | 1;
}

export type RunState = 'running' | 'stopped' | 'no-data';

/** One accepted reading, as the ingest hands it to listeners (live push, rule engine). */
export interface AcceptedReading {
  engineId: number;
  channel: ChannelKey;
  ts: number;
  value: number;
  quality: 0 | 1;
}

export interface LiveState {
  latest(engineId: number): Partial<Record<ChannelKey, LatestValue>>;
  lastSeen(engineId: number): number | null;
  runState(engineId: number, now?: number): RunState;
}

export interface IngestCounters {
  received: number;
  stored: number;
  /** Accepted readings not stored again because the same (engine, channel, ts) was already stored. */
  duplicate: number;
  /** MQTT connections closed for declaring a packet larger than the broker accepts. */
  oversizePacketsClosed: number;
  rejected: Record<string, number>;
  outOfRange: number;
  buffered: number;
  batches: number;
  batchLatencyMs: { last: number; p50: number; p95: number; max: number };
  /** Event-loop delay over the last few seconds (and the worst window since start), ms. */
  eventLoopDelayMs?: LoopDelay & { worst: number };
  startedAt: string;
  /** Sparkplug B sessions (embedded broker only). */
  sparkplug?: { births: number; deaths: number; seqGaps: number; rebirthRequests: number; nodesOnline: number; sessionsEndedByRecord: number };
}

export interface LoopDelay {
  p50: number;
  p99: number;
  max: number;
}

export interface AuthUser {
  id: number;
  email: string;
  role: 'admin' | 'planner' | 'technician' | 'operator';
  /** The user's session version when the token was signed; a change ends the session. */
  sv?: number;
}

export interface TelemetryDeps {
  config: Config;
  sequelize: Sequelize;
  httpServer: http.Server;
  /** Checks a JWT from a socket.io handshake; null when it is not valid. */
  verifyToken(token: string): AuthUser | null;
  /** siteId of an engine, for live-push rooms; null when unknown. */
  siteOfEngine(engineId: number): Promise<number | null>;
  /** Sites a user may see, for the rooms of a live-push watch; absent: every site. */
  siteScope?(user: AuthUser): Promise<{ all: boolean; siteIds: readonly number[] }>;
  /** Whether a verified token's session is still valid (user enabled, session version current). */
  sessionValid?(user: AuthUser): Promise<boolean>;
  /** Revoke/rotate and user changes, to cut devices and sockets off at once. */
  access?: AccessEvents;
  log: Logger;
  /** Several servers (server/cluster): socket.io adapter between them; readings are relayed through it too. */
  adapter?: ServerOptions['adapter'];
  /**
   * Several servers (server/cluster): the Sparkplug B host role, held by one server at a time. Absent: this
   * server is the only one and holds it (with an external broker: not with MQTT_SHARED_GROUP).
   */
  hostRole?: { onChange(fn: (holder: boolean) => Promise<void> | void): void };
  /** Resolves once this server's broker account may publish the host's STATE and commands (dynsec). */
  sparkplugHostReady?(): Promise<void>;
}

export interface Telemetry {
  liveState: LiveState;
  counters(): IngestCounters;
  /** Per-device reject counts since start (also persisted in device_rejections). */
  /** Called for every batch of accepted readings (after validation, before the write). */
  onReadings(listener: (readings: AcceptedReading[]) => void): void;
  /** Called when a gateway declares an engine's data lost (Sparkplug NDEATH/DDEATH). */
  onLost?(listener: (engineId: number, at: number) => void): void;
  /** Ask a Sparkplug edge node for its births again (a no-op on a server without the host role), e.g. after its metric names were remapped. */
  requestRebirth?(groupId: string, edgeNodeId: string): void;
  /** Emit an event to a socket.io room (`fleet`, `site:<id>`, `engine:<id>`), or to several (each socket once). */
  emit(room: string | string[], event: string, payload: unknown): void;
  /** Flush the buffer and close broker and sockets. */
  stop(): Promise<void>;
  /** The external broker connection (MQTT_URL); null with the embedded broker. */
  brokerState(): BrokerState | null;
  /** External broker: whether this server is the Sparkplug B Primary Host now (role held and STATE online); null with the embedded broker. */
  sparkplugHostState?(): SparkplugHostState | null;
  /** Several servers: readings relayed to and from the other servers since start; null with one server. */
  relayCounters?(): { sentReadings: number; sentMessages: number; receivedReadings: number; badMessages: number } | null;
}

export interface SparkplugHostState {
  /** The host id edge nodes watch (`spBv1.0/STATE/<hostId>`). */
  hostId: string;
  /** This server holds the host role. */
  holder: boolean;
  /** Connected, subscribed and STATE online published. */
  online: boolean;
}

export interface BrokerState {
  connected: boolean;
  /** Why it is not connected (refused credentials, connection lost); null while connected. */
  lastError: string | null;
  /** Next reconnect attempt in ms (doubles on each failure, capped). */
  retryInMs: number;
  since: string;
}
