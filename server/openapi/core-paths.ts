import { body, errors, idParam, json, ref, type OpenApiGroup } from './helpers';

const admin = { security: [{ bearer: [] }] };
const list = (name: string) => json({ type: 'array', items: ref(name) });

export const authPaths: OpenApiGroup = {
  tag: 'auth',
  paths: {
    '/api/auth/login': {
      post: {
        summary:
          'Sign in. `session: "cookie"` (the browser app, with the x-jw-request header): the token is set as an httpOnly SameSite=Strict cookie and left out of the answer; otherwise the answer carries the bearer token',
        security: [],
        requestBody: body({
          type: 'object',
          required: ['email', 'password'],
          properties: { email: { type: 'string' }, password: { type: 'string' }, session: { enum: ['cookie', 'token'] } },
        }),
        responses: {
          '200': json({ type: 'object', properties: { token: { type: 'string' }, user: ref('User') } }),
          ...errors({ input: true }),
          '403': json(ref('Error'), 'a cookie sign-in from another site'),
          '429': json(ref('Error'), 'too many failed attempts'),
        },
      },
    },
    '/api/auth/logout': {
      post: {
        summary: 'Sign out: clears the session cookie',
        security: [],
        responses: { '200': json({ type: 'object', properties: { signedOut: { type: 'boolean' } } }) },
      },
    },
    '/api/auth/me': { get: { summary: 'The signed-in user', responses: { '200': json(ref('User')), ...errors() } } },
  },
};

export const healthPaths: OpenApiGroup = {
  tag: 'health',
  paths: {
    '/api/health': { get: { summary: 'Liveness and summary ingest counters', security: [], responses: { '200': json({ type: 'object' }) } } },
    '/api/admin/ingest': {
      get: { summary: 'Full ingest counters and per-device rejections', ...admin, responses: { '200': json({ type: 'object' }), ...errors({ admin: true }) } },
    },
    '/api/openapi.json': { get: { summary: 'This document', security: [], responses: { '200': json({ type: 'object' }) } } },
  },
};

const retiredQuery = { name: 'includeRetired', in: 'query', schema: { enum: ['true', 'false'] } };

export const sitePaths: OpenApiGroup = {
  tag: 'sites',
  paths: {
    '/api/sites': {
      get: { summary: 'Sites', parameters: [retiredQuery], responses: { '200': list('Site'), ...errors() } },
      post: {
        summary: 'Create a site (admin)',
        requestBody: body(ref('SiteInput')),
        responses: { '201': json(ref('Site')), ...errors({ admin: true, input: true }) },
      },
    },
    '/api/sites/{id}': {
      parameters: [idParam],
      patch: {
        summary: 'Change a site (admin)',
        requestBody: body(ref('SiteInput')),
        responses: { '200': json(ref('Site')), ...errors({ admin: true, input: true, notFound: true }) },
      },
      delete: { summary: 'Retire a site (admin)', responses: { '200': json(ref('Site')), ...errors({ admin: true, notFound: true }) } },
    },
  },
};

export const enginePaths: OpenApiGroup = {
  tag: 'engines',
  paths: {
    '/api/engines': {
      get: {
        summary: 'Engines with live values',
        parameters: [retiredQuery, { name: 'siteId', in: 'query', schema: { type: 'integer' } }],
        responses: { '200': list('Engine'), ...errors() },
      },
      post: {
        summary: 'Create an engine (admin)',
        requestBody: body(ref('EngineInput')),
        responses: { '201': json(ref('Engine')), ...errors({ admin: true, input: true }) },
      },
    },
    '/api/engines/{id}': {
      parameters: [idParam],
      get: { summary: 'One engine', responses: { '200': json(ref('Engine')), ...errors({ notFound: true }) } },
      patch: {
        summary: 'Change an engine (admin)',
        requestBody: body(ref('EngineInput')),
        responses: { '200': json(ref('Engine')), ...errors({ admin: true, input: true, notFound: true }) },
      },
      delete: { summary: 'Retire an engine (admin)', responses: { '200': json(ref('Engine')), ...errors({ admin: true, notFound: true }) } },
    },
    '/api/engines/{id}/readings': {
      parameters: [idParam],
      get: {
        summary: 'Bucketed readings: raw up to 6 h, per-minute rollups beyond or before the raw retention',
        parameters: [
          {
            name: 'channel',
            in: 'query',
            required: true,
            schema: { enum: ['coolant_temp', 'coolant_pressure', 'coolant_conductivity', 'engine_speed', 'ambient_temp'] },
          },
          { name: 'from', in: 'query', description: 'epoch ms or ISO 8601; default to - 24 h', schema: { type: 'string' } },
          { name: 'to', in: 'query', description: 'epoch ms or ISO 8601; default now', schema: { type: 'string' } },
          { name: 'points', in: 'query', schema: { type: 'integer', minimum: 1, maximum: 2000, default: 500 } },
        ],
        responses: { '200': json(ref('Buckets')), ...errors({ input: true, notFound: true }) },
      },
    },
  },
};

export const devicePaths: OpenApiGroup = {
  tag: 'devices',
  paths: {
    '/api/devices': {
      get: { summary: 'Devices (admin)', responses: { '200': list('Device'), ...errors({ admin: true }) } },
      post: {
        summary: 'Create a device; the secret is returned once (admin)',
        requestBody: body({
          type: 'object',
          required: ['engineId'],
          properties: {
            engineId: { type: 'integer' },
            username: { type: 'string' },
            sparkplug: {
              type: 'object',
              required: ['groupId', 'edgeNodeId'],
              description: 'Sparkplug B identity: the device may publish only under spBv1.0/{groupId}/.../{edgeNodeId}[/{deviceId}]',
              properties: { groupId: { type: 'string' }, edgeNodeId: { type: 'string' }, deviceId: { type: 'string' } },
            },
          },
        }),
        responses: { '201': json(ref('DeviceWithSecret')), ...errors({ admin: true, input: true }) },
      },
    },
    '/api/devices/{id}/rotate': {
      parameters: [idParam],
      post: { summary: 'New secret, returned once (admin)', responses: { '200': json(ref('DeviceWithSecret')), ...errors({ admin: true, notFound: true }) } },
    },
    '/api/devices/{id}/metric-map': {
      parameters: [idParam],
      put: {
        summary: 'Sparkplug metric names to channels, e.g. { "Engine/Coolant/Temp": "coolant_temp" } or { channel, unit }; applies from the next birth (admin)',
        requestBody: body({
          type: 'object',
          additionalProperties: {
            oneOf: [{ type: 'string' }, { type: 'object', required: ['channel'], properties: { channel: { type: 'string' }, unit: { type: 'string' } } }],
          },
        }),
        responses: { '200': json(ref('Device')), ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
    '/api/devices/{id}/revoke': {
      parameters: [idParam],
      post: { summary: 'Revoke a device (admin)', responses: { '200': json(ref('Device')), ...errors({ admin: true, notFound: true }) } },
    },
  },
};

export const userPaths: OpenApiGroup = {
  tag: 'users',
  paths: {
    '/api/users': {
      get: { summary: 'Users (admin)', responses: { '200': list('User'), ...errors({ admin: true }) } },
      post: {
        summary: 'Create a user (admin)',
        requestBody: body(ref('UserInput')),
        responses: { '201': json(ref('User')), ...errors({ admin: true, input: true }) },
      },
    },
    '/api/users/{id}': {
      parameters: [idParam],
      patch: {
        summary: 'Change a user (admin)',
        requestBody: body(ref('UserInput')),
        responses: { '200': json(ref('User')), ...errors({ admin: true, input: true, notFound: true }) },
      },
      delete: { summary: 'Disable a user (admin)', responses: { '200': json(ref('User')), ...errors({ admin: true, notFound: true }) } },
    },
    '/api/users/{id}/sites': {
      parameters: [idParam],
      put: {
        summary: 'Limit a user to some sites (admin)',
        description:
          'Replaces the list. A user with sites sees only their engines, readings, alarms, work orders, attachments, coolant tests and due-list items; anything of another site answers 404. Empty list: every site. Admins see every site whatever the list.',
        requestBody: body(ref('UserSites')),
        responses: { '200': json(ref('User')), ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
  },
};
