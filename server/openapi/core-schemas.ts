import type { Json } from './helpers';
import { ref } from './helpers';

const num = (description: string, min?: number, max?: number): Json => ({
  type: 'number',
  description,
  ...(min !== undefined ? { minimum: min } : {}),
  ...(max !== undefined ? { maximum: max } : {}),
});
const latest: Json = {
  type: 'object',
  properties: { value: { type: 'number' }, ts: { type: 'integer', description: 'ms since epoch' }, quality: { enum: [0, 1] } },
};

const engineFields: Record<string, Json> = {
  siteId: { type: 'integer' },
  name: { type: 'string', maxLength: 120 },
  duty: { enum: ['standby', 'prime', 'continuous'] },
  capacityL: num('cooling-system capacity, litres', 1, 5000),
  coolantFamily: { enum: ['conventional', 'extended-life'] },
  glycolType: { enum: ['ethylene', 'propylene'] },
  glycolPercent: num('glycol by volume, %', 0, 70),
  capPressureKpa: num('rated cap pressure, kPa gauge', 0, 300),
  oilDrainIntervalH: num('hours between oil changes', 50, 5000),
  runHours: num('hour meter, h', 0),
  safeOpenTempC: num('coolant temperature below which the system may be opened, degC', 20, 70),
  heaterSetpointC: { type: ['number', 'null'], description: 'jacket-water heater setpoint, degC; null when none' },
  outOfService: { type: 'boolean' },
};

export const coreSchemas: Record<string, Json> = {
  Error: { type: 'object', required: ['error'], properties: { error: { type: 'string' }, field: { type: 'string' } } },
  User: {
    type: 'object',
    properties: {
      id: { type: 'integer' },
      email: { type: 'string' },
      name: { type: 'string' },
      role: { enum: ['admin', 'planner', 'technician', 'operator'] },
      disabled: { type: 'boolean' },
      createdAt: { type: 'string', format: 'date-time' },
      updatedAt: { type: 'string', format: 'date-time' },
      siteIds: {
        type: 'array',
        items: { type: 'integer' },
        description: 'sites the user is limited to (admin views); empty: every site. Admins always see every site',
      },
    },
  },
  UserSites: {
    type: 'object',
    required: ['siteIds'],
    additionalProperties: false,
    properties: { siteIds: { type: 'array', items: { type: 'integer', minimum: 1 }, maxItems: 1000, description: 'empty: the user sees every site again' } },
  },
  UserInput: {
    type: 'object',
    required: ['email', 'name', 'password', 'role'],
    properties: {
      email: { type: 'string', format: 'email' },
      name: { type: 'string' },
      password: { type: 'string', minLength: 10 },
      role: { enum: ['admin', 'planner', 'technician', 'operator'] },
      disabled: { type: 'boolean' },
    },
  },
  Site: {
    type: 'object',
    properties: {
      id: { type: 'integer' },
      name: { type: 'string' },
      timeZone: { type: 'string', description: 'IANA zone' },
      designLowTempC: { type: ['number', 'null'], description: 'lowest expected temperature, degC' },
      retiredAt: { type: ['string', 'null'], format: 'date-time' },
    },
  },
  SiteInput: {
    type: 'object',
    required: ['name', 'timeZone'],
    properties: {
      name: { type: 'string' },
      timeZone: { type: 'string' },
      designLowTempC: { type: ['number', 'null'], description: 'lowest expected temperature, degC (-80 to 40)' },
    },
  },
  EngineInput: { type: 'object', required: ['siteId', 'name', 'capacityL'], properties: engineFields, additionalProperties: false },
  Engine: {
    type: 'object',
    properties: {
      id: { type: 'integer' },
      ...engineFields,
      retiredAt: { type: ['string', 'null'], format: 'date-time' },
      latest: { type: 'object', additionalProperties: latest, description: 'by channel key' },
      lastSeenAt: { type: ['integer', 'null'], description: 'ms since epoch of the last reading' },
      runState: { enum: ['running', 'stopped', 'no-data'] },
      readiness: {
        type: 'object',
        description:
          'standby engines only: "Ready" or "Not ready" with the reasons in words (cold jacket water, an active high or urgent alarm, stale data, an open lockout, out of service)',
        properties: { ready: { type: 'boolean' }, reasons: { type: 'array', items: { type: 'string' } } },
      },
      freezeProtection: {
        type: 'object',
        description: 'engines with a glycol or freeze-point test: the latest such test judged now against the site design low less the freeze margin',
        properties: {
          status: { enum: ['ok', 'short', 'high', 'unknown'] },
          freezePointC: { type: ['number', 'null'] },
          requiredC: { type: ['number', 'null'] },
          designLowC: { type: ['number', 'null'] },
          marginK: { type: 'number' },
          testId: { type: 'integer' },
          testedAt: { type: 'string', format: 'date-time' },
          message: { type: 'string' },
          action: { type: 'string' },
        },
      },
    },
  },
  Device: {
    type: 'object',
    properties: {
      id: { type: 'integer' },
      engineId: { type: 'integer' },
      username: { type: 'string' },
      revokedAt: { type: ['string', 'null'] },
      lastSeenAt: { type: ['string', 'null'] },
      sparkplug: { type: ['object', 'null'] },
      metricMap: { type: ['object', 'null'] },
    },
  },
  DeviceWithSecret: { allOf: [ref('Device'), { type: 'object', properties: { secret: { type: 'string', description: 'shown only in this response' } } }] },
  Buckets: {
    type: 'object',
    properties: {
      source: { enum: ['raw', 'rollup'], description: 'rollup: per-minute summaries (span over 6 h, or the range reaches back past the raw retention)' },
      rawRetentionDays: { type: 'integer', description: 'RAW_RETENTION_DAYS; 0 keeps raw readings for good' },
      rawKeptFrom: { type: ['integer', 'null'], description: 'raw readings are kept from this instant (epoch ms); older ranges come from rollups' },
      beyondRawRetention: { type: 'boolean', description: 'the range starts before rawKeptFrom' },
      buckets: {
        type: 'array',
        items: {
          type: 'object',
          properties: { t: { type: 'integer' }, min: { type: 'number' }, max: { type: 'number' }, mean: { type: 'number' }, count: { type: 'integer' } },
        },
      },
    },
  },
};
