import type { EngineFreezeStatus } from '../../../shared/api/coolant-view';
import { ChannelValues } from '../core/live-reading';

export type RunState = 'running' | 'stopped' | 'no-data';

export interface Site {
  id: number;
  name: string;
  timeZone: string;
  /** Lowest expected temperature, °C; null when not set. */
  designLowTempC?: number | null;
  elevationM?: number | null;
}

/** GET /api/engines item (SI units). */
export interface Engine {
  id: number;
  name: string;
  siteId: number;
  duty: 'standby' | 'prime' | 'continuous';
  capacityL: number;
  coolantFamily: string;
  glycolType: string;
  glycolPercent: number;
  capPressureKpa: number;
  oilDrainIntervalH: number;
  runHours: number;
  safeOpenTempC: number;
  heaterSetpointC: number | null;
  outOfService: boolean;
  latest: ChannelValues;
  lastSeenAt: number | string | null;
  runState: RunState;
  /** Filled in by the alarms feature when it exists. */
  activeAlarms?: number;
  /** Standby engines only: ready to start and take load, or the reasons why not, in words. */
  readiness?: { ready: boolean; reasons: string[] };
  /** Freeze protection of the latest glycol or freeze-point test against the site's design low (absent without such a test). */
  freezeProtection?: EngineFreezeStatus;
}
