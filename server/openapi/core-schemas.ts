/** Response bodies of the core routes (health, auth, sites, engines, devices, users), as the handlers answer them. */
import { z } from 'zod';
import { CHANNEL_KEYS } from '../../shared/channels';
import { COOLANT_FAMILIES, DUTIES, GLYCOL_TYPES } from '../models/engine';
import { ROLES } from '../models/user';
import type { EngineRecordView, EngineView } from '../../shared/api/engine-view';
import { covers } from './api-doc';

const isoTime = z.string().openapi({ format: 'date-time' });
const isoOrNull = isoTime.nullable();

export const SessionUser = z.object({ id: z.number().int(), email: z.string(), name: z.string(), role: z.enum(ROLES) }).openapi('SessionUser');
export const LoginAnswer = z.object({
  token: z.string().optional().openapi({ description: 'the bearer token; left out with `session: "cookie"` (set as an httpOnly cookie instead)' }),
  user: SessionUser,
});

export const User = z
  .object({
    id: z.number().int(),
    email: z.string(),
    name: z.string(),
    role: z.enum(ROLES),
    disabled: z.boolean(),
    createdAt: isoTime,
    updatedAt: isoTime,
    siteIds: z.array(z.number().int()).openapi({ description: 'sites the user is limited to; empty: every site. Admins always see every site' }),
  })
  .openapi('User');

export const Site = z
  .object({
    id: z.number().int(),
    name: z.string(),
    timeZone: z.string().openapi({ description: 'IANA zone' }),
    designLowTempC: z.number().nullable().openapi({ description: 'lowest expected temperature, degC' }),
    elevationM: z.number().nullable().openapi({ description: 'metres above mean sea level; null: unknown' }),
    retiredAt: isoOrNull,
  })
  .openapi('Site');

const latestValue = z.object({
  value: z.number(),
  ts: z.number().int().openapi({ description: 'ms since epoch' }),
  quality: z.union([z.literal(0), z.literal(1)]),
});
const freezeProtection = z.object({
  status: z.enum(['ok', 'short', 'high', 'unknown']),
  freezePointC: z.number().nullable(),
  requiredC: z.number().nullable(),
  designLowC: z.number().nullable(),
  marginK: z.number(),
  testId: z.number().int(),
  testedAt: isoTime,
  message: z.string(),
  action: z.string(),
});

const engineCore = {
  id: z.number().int(),
  siteId: z.number().int(),
  name: z.string(),
  duty: z.enum(DUTIES),
  capacityL: z.number().openapi({ description: 'cooling-system capacity, litres' }),
  coolantFamily: z.enum(COOLANT_FAMILIES),
  glycolType: z.enum(GLYCOL_TYPES),
  glycolPercent: z.number().openapi({ description: 'glycol by volume, %' }),
  capPressureKpa: z.number().openapi({ description: 'rated cap pressure, kPa gauge' }),
  oilDrainIntervalH: z.number(),
  runHours: z.number(),
  safeOpenTempC: z.number().openapi({ description: 'coolant temperature below which the system may be opened, degC' }),
  heaterSetpointC: z.number().nullable(),
  outOfService: z.boolean(),
  retiredAt: isoOrNull,
  createdAt: isoTime,
  updatedAt: isoTime,
  latest: z.partialRecord(z.enum(CHANNEL_KEYS as [string, ...string[]]), latestValue).openapi({ description: 'latest value by channel key' }),
  lastSeenAt: z.number().int().nullable().openapi({ description: 'ms since epoch of the last reading' }),
  runState: z.enum(['running', 'stopped', 'no-data']),
};

/** An engine as written (create, change, retire): its record with live values. */
export const Engine = z.object(engineCore).openapi('Engine');
covers<EngineRecordView>()(Engine);

/** An engine as read (list, one): with the active-alarm count, standby readiness and freeze protection. */
export const EngineStatus = z
  .object({
    ...engineCore,
    activeAlarms: z.number().int(),
    readiness: z
      .object({ ready: z.boolean(), reasons: z.array(z.string()) })
      .optional()
      .openapi({ description: 'standby engines only: ready, or the reasons in words' }),
    freezeProtection: freezeProtection.optional().openapi({ description: 'engines with a glycol or freeze-point test' }),
  })
  .openapi('EngineStatus');
covers<EngineView>()(EngineStatus);

export const Buckets = z
  .object({
    source: z.enum(['raw', 'rollup']).openapi({ description: 'rollup: per-minute or per-hour summaries (long spans, or before the raw retention)' }),
    rollupPeriod: z.enum(['minute', 'hour']).nullable(),
    rawRetentionDays: z.number().int().openapi({ description: 'RAW_RETENTION_DAYS; 0 keeps raw readings for good' }),
    rawKeptFrom: z.number().int().nullable().openapi({ description: 'raw readings are kept from this instant (epoch ms)' }),
    beyondRawRetention: z.boolean(),
    buckets: z.array(z.object({ t: z.number().int(), min: z.number(), max: z.number(), mean: z.number(), count: z.number().int() })),
  })
  .openapi('Buckets');

export const Device = z
  .object({
    id: z.number().int(),
    engineId: z.number().int(),
    username: z.string(),
    revokedAt: isoOrNull,
    lastSeenAt: isoOrNull,
    createdAt: isoTime,
    updatedAt: isoTime,
    sparkplug: z.object({ groupId: z.string(), edgeNodeId: z.string(), deviceId: z.string().nullable() }).nullable(),
    metricMap: z
      .record(z.string(), z.union([z.string(), z.object({ channel: z.string(), unit: z.string().optional() })]))
      .nullable()
      .openapi({ description: 'Sparkplug metric name to channel' }),
  })
  .openapi('Device');
export const DeviceWithSecret = Device.extend({ secret: z.string().openapi({ description: 'shown only in this answer' }) }).openapi('DeviceWithSecret');

const counts = { received: z.number().int(), stored: z.number().int(), duplicate: z.number().int(), buffered: z.number().int() };
export const Health = z.object({
  status: z.enum(['ok', 'degraded']),
  broker: z
    .object({
      connected: z.boolean(),
      lastError: z.string().nullable(),
      retryInMs: z.number(),
      since: isoTime,
      // the Sparkplug B Primary Host role: held by one server at a time (online: STATE published)
      sparkplugHost: z.object({ hostId: z.string(), holder: z.boolean(), online: z.boolean() }).optional(),
    })
    .optional(),
  cluster: z
    .object({
      connected: z.boolean(),
      members: z.number().int(),
      owned: z.number().int(),
      ownedPartitions: z.array(z.number().int()),
      partitions: z.number().int(),
      lastError: z.string().nullable(),
      relay: z.object({ sentReadings: z.number(), sentMessages: z.number(), receivedReadings: z.number(), badMessages: z.number() }).nullable(),
    })
    .optional(),
  uptimeS: z.number().int(),
  version: z.string(),
  ingest: z.object({ ...counts, rejected: z.number().int() }).nullable(),
});

export const IngestReport = z.object({
  counters: z
    .object({
      ...counts,
      oversizePacketsClosed: z.number().int(),
      rejected: z.record(z.string(), z.number().int()).openapi({ description: 'by reason' }),
      outOfRange: z.number().int(),
      batches: z.number().int(),
      batchLatencyMs: z.object({ last: z.number(), p50: z.number(), p95: z.number(), max: z.number() }),
      eventLoopDelayMs: z.object({ p50: z.number(), p99: z.number(), max: z.number(), worst: z.number() }).optional(),
      startedAt: isoTime,
      sparkplug: z
        .object({
          births: z.number(),
          deaths: z.number(),
          seqGaps: z.number(),
          rebirthRequests: z.number(),
          nodesOnline: z.number(),
          sessionsEndedByRecord: z.number(),
        })
        .optional(),
    })
    .nullable(),
  rejections: z.array(
    z.object({
      deviceId: z.number().int(),
      username: z.string().nullable(),
      engineId: z.number().int().nullable(),
      reason: z.string(),
      count: z.number().int(),
      lastAt: isoOrNull,
      lastDetail: z.string().nullable(),
    }),
  ),
});

/** GET /api/openapi.json answers this very document. */
export const OpenApiDocument = z.object({
  openapi: z.string(),
  info: z.object({ title: z.string(), version: z.string(), description: z.string().optional() }),
  paths: z.record(z.string(), z.record(z.string(), z.unknown())),
  components: z.record(z.string(), z.unknown()).optional(),
});
