import type { EngineView } from '../../../shared/api/engine-view';
import { ChannelValues } from '../core/live-reading';

export type { RunState } from '../../../shared/api/engine-view';

export interface Site {
  id: number;
  name: string;
  timeZone: string;
  /** Lowest expected temperature, °C; null when not set. */
  designLowTempC?: number | null;
  elevationM?: number | null;
}

/** GET /api/engines item (shared/api/engine-view.ts), as the client keeps it: live pushes are merged into `latest`. */
export interface Engine extends Omit<EngineView, 'latest'> {
  latest: ChannelValues;
}
