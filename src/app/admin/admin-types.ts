import { Role } from '../core/user';
import { Engine, Site } from '../fleet/fleet-types';

export type { Engine, Site };

/** GET /api/users item. */
export interface AdminUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  disabled: boolean;
  /** Sites the user is limited to; empty: every site (admins always see every site). */
  siteIds?: number[];
  createdAt?: string;
  updatedAt?: string;
}

/** GET /api/devices item; the secret never comes back after creation or rotation. */
/** A gateway's Sparkplug B identity (server/models/device.ts toJSON). */
export interface SparkplugIdentity {
  groupId: string;
  edgeNodeId: string;
  deviceId: string | null;
}

/** A gateway's metric names to our channels (shared/sparkplug/channels.ts MetricMap). */
export type MetricMapEntry = string | { channel: string; unit?: string };

export interface Device {
  id: number;
  engineId: number;
  username: string;
  revokedAt: string | null;
  lastSeenAt: string | number | null;
  createdAt?: string;
  sparkplug?: SparkplugIdentity | null;
  metricMap?: Record<string, MetricMapEntry> | null;
}

export interface DeviceWithSecret extends Device {
  secret: string;
}

/** One row of GET /api/admin/ingest `rejections`. */
export interface DeviceRejection {
  deviceId: number;
  username: string | null;
  engineId: number | null;
  reason: string;
  count: number;
  lastAt: string | number | null;
  lastDetail: string | null;
}

export interface IngestReport {
  counters: Record<string, unknown> | null;
  rejections: DeviceRejection[];
}

/** What POST/PATCH /api/engines take: SI units only. */
export type { EngineInput } from '../../../shared/api/engine-view';

export const ROLES: { value: Role; label: string }[] = [
  { value: 'admin', label: 'Administrator' },
  { value: 'planner', label: 'Planner' },
  { value: 'technician', label: 'Technician' },
  { value: 'operator', label: 'Operator' },
];
export const ROLE_LABEL: Record<Role, string> = Object.fromEntries(ROLES.map((r) => [r.value, r.label])) as Record<Role, string>;
