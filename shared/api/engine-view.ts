/** JSON shapes of the engine API (server/routes/engines.ts, server/openapi/core-schemas.ts), shared by server and client. Types only. */
import type { CoolantFamily } from '../coolant/additive';
import type { GlycolType } from '../coolant/glycol';
import type { EngineFreezeStatus } from './coolant-view';
import type { LiveValues } from './live-view';

export type EngineDuty = 'standby' | 'prime' | 'continuous';
export type RunState = 'running' | 'stopped' | 'no-data';

/** What POST/PATCH /api/engines take (SI units only). */
export interface EngineInput {
  siteId: number;
  name: string;
  duty: EngineDuty;
  /** Cooling-system capacity, litres. */
  capacityL: number;
  coolantFamily: CoolantFamily;
  glycolType: GlycolType;
  /** Glycol by volume, %. */
  glycolPercent: number;
  /** Rated cap pressure, kPa gauge. */
  capPressureKpa: number;
  oilDrainIntervalH: number;
  runHours: number;
  /** Coolant temperature below which the system may be opened, °C. */
  safeOpenTempC: number;
  heaterSetpointC: number | null;
  outOfService: boolean;
}

/** An engine as written (create, change, retire): its record with its latest values (times as ISO strings). */
export interface EngineRecordView extends EngineInput {
  id: number;
  retiredAt: string | null;
  createdAt: string;
  updatedAt: string;
  latest: LiveValues;
  /** ms since the epoch of the last reading. */
  lastSeenAt: number | null;
  runState: RunState;
}

/** An engine as read (GET /api/engines, GET /api/engines/:id): with the active-alarm count, standby readiness and freeze protection. */
export interface EngineView extends EngineRecordView {
  activeAlarms: number;
  /** Standby engines only: ready to start and take load, or the reasons why not, in words. */
  readiness?: { ready: boolean; reasons: string[] };
  /** Freeze protection of the latest glycol or freeze-point test against the site's design low (absent without such a test). */
  freezeProtection?: EngineFreezeStatus;
}
