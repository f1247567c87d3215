import { body, errors, idParam, json, ref, type OpenApiGroup } from './helpers';

const list = (name: string) => json({ type: 'array', items: ref(name) });
const obj = json({ type: 'object' });

/** Alarms, on-call rota, rules and the mail views. */
export const alarmsOpenApi: OpenApiGroup = {
  tag: 'alarms',
  paths: {
    '/api/alarms': {
      get: {
        summary: 'Alarms, newest first',
        parameters: [
          { name: 'state', in: 'query', schema: { enum: ['active', 'shelved', 'open', 'all'], default: 'active' } },
          { name: 'engineId', in: 'query', schema: { type: 'integer' } },
          { name: 'limit', in: 'query', schema: { type: 'integer', maximum: 1000 } },
        ],
        responses: { '200': list('Alarm'), ...errors({ input: true }) },
      },
    },
    '/api/alarms/summary': { get: { summary: 'Open alarms by state and priority; alarm flood flag (ISA-18.2)', responses: { '200': obj, ...errors() } } },
    '/api/alarms/performance': {
      get: {
        summary: 'Alarm performance: per day, per 10 min, most frequent, chattering, standing, time to acknowledge',
        parameters: [
          { name: 'from', in: 'query', schema: { type: 'string' } },
          { name: 'to', in: 'query', schema: { type: 'string' } },
          {
            name: 'chatterCount',
            in: 'query',
            schema: { type: 'integer', minimum: 2, default: 3 },
            description: 'activations within the window that make an alarm chattering',
          },
          { name: 'chatterWindowS', in: 'query', schema: { type: 'integer', minimum: 1, default: 60 } },
        ],
        responses: { '200': obj, ...errors({ input: true }) },
      },
    },
    '/api/alarms/{id}': {
      parameters: [
        idParam,
        { name: 'limit', in: 'query', schema: { type: 'integer', default: 200, maximum: 1000 } },
        { name: 'offset', in: 'query', schema: { type: 'integer', default: 0 } },
      ],
      get: {
        summary: 'One alarm with the first page of its history (time order) and historyTotal',
        responses: { '200': json(ref('Alarm')), ...errors({ input: true, notFound: true }) },
      },
    },
    '/api/alarms/{id}/history': {
      parameters: [
        idParam,
        { name: 'limit', in: 'query', schema: { type: 'integer', default: 200, maximum: 1000 } },
        { name: 'offset', in: 'query', schema: { type: 'integer', default: 0 } },
      ],
      get: {
        summary: "A page of an alarm's history in time order: { total, limit, offset, entries }",
        responses: { '200': obj, ...errors({ input: true, notFound: true }) },
      },
    },
    '/api/alarms/{id}/acknowledge': {
      parameters: [idParam],
      post: {
        summary: 'Acknowledge (operator, technician, planner, admin)',
        requestBody: { required: false, content: { 'application/json': { schema: { type: 'object', properties: { note: { type: 'string' } } } } } },
        responses: { '200': json(ref('Alarm')), ...errors({ admin: true, input: true, notFound: true }), '409': json(ref('Error'), 'transition refused') },
      },
    },
    '/api/alarms/{id}/shelve': {
      parameters: [idParam],
      post: {
        summary: 'Shelve for a time with a reason (planner, admin); it comes back by itself',
        requestBody: body({
          type: 'object',
          required: ['minutes', 'reason'],
          properties: { minutes: { type: 'integer', minimum: 1, maximum: 1440 }, reason: { type: 'string' } },
        }),
        responses: { '200': json(ref('Alarm')), ...errors({ admin: true, input: true, notFound: true }), '409': json(ref('Error'), 'transition refused') },
      },
    },
    '/api/alarms/{id}/unshelve': {
      parameters: [idParam],
      post: {
        summary: 'End a shelf early (planner, admin)',
        responses: { '200': json(ref('Alarm')), ...errors({ admin: true, notFound: true }), '409': json(ref('Error'), 'not shelved') },
      },
    },
    '/api/alarms/{id}/notes': {
      parameters: [idParam],
      post: {
        summary: 'Add a note',
        requestBody: body({ type: 'object', required: ['note'], properties: { note: { type: 'string' } } }),
        responses: { '201': json(ref('Alarm')), ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
    '/api/oncall': {
      get: {
        summary: 'On-call rota',
        parameters: [
          { name: 'siteId', in: 'query', schema: { type: 'integer' } },
          { name: 'from', in: 'query', schema: { type: 'string' } },
          { name: 'to', in: 'query', schema: { type: 'string' } },
        ],
        responses: { '200': list('OncallShift'), ...errors({ input: true }) },
      },
      post: {
        summary: 'Add a shift (planner, admin)',
        requestBody: body(ref('OncallShiftInput')),
        responses: { '201': json(ref('OncallShift')), ...errors({ admin: true, input: true }) },
      },
    },
    '/api/people': {
      get: {
        summary: 'People for the on-call rota: enabled accounts, read-only (planner, admin)',
        parameters: [
          { name: 'role', in: 'query', description: 'one role or several, comma-separated', schema: { type: 'string', example: 'technician,planner' } },
        ],
        responses: {
          '200': json({
            type: 'array',
            items: {
              type: 'object',
              required: ['id', 'name', 'email', 'role'],
              properties: {
                id: { type: 'integer' },
                name: { type: 'string' },
                email: { type: 'string' },
                role: { enum: ['admin', 'planner', 'technician', 'operator'] },
              },
            },
          }),
          ...errors({ admin: true, input: true }),
        },
      },
    },
    '/api/oncall/{id}': {
      parameters: [idParam],
      patch: {
        summary: 'Change a shift (planner, admin)',
        requestBody: body(ref('OncallShiftInput')),
        responses: { '200': json(ref('OncallShift')), ...errors({ admin: true, input: true, notFound: true }) },
      },
      delete: { summary: 'Remove a shift (planner, admin)', responses: { '204': { description: 'removed' }, ...errors({ admin: true, notFound: true }) } },
    },
    '/api/rules': {
      get: { summary: 'Default rule profile (admin)', responses: { '200': obj, ...errors({ admin: true }) } },
      put: {
        summary: 'Replace the default rule profile (admin)',
        requestBody: body({ type: 'object', properties: { rules: { type: 'array', items: ref('RuleDefinition') } } }),
        responses: { '200': obj, ...errors({ admin: true, input: true }) },
      },
    },
    '/api/rules/engines/{id}': {
      parameters: [idParam],
      get: { summary: "An engine's rules with its overrides (admin)", responses: { '200': obj, ...errors({ admin: true, notFound: true }) } },
      put: {
        summary: "Replace an engine's overrides (admin)",
        requestBody: body({
          type: 'object',
          properties: {
            rules: {
              type: 'array',
              items: { type: 'object', properties: { rule: { type: 'string' }, enabled: { type: 'boolean' }, params: { type: 'object' } } },
            },
          },
        }),
        responses: { '200': obj, ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
    '/api/rules/preview': {
      post: {
        summary: "What a rule would have raised over an engine's stored readings (at most 7 days; admin)",
        requestBody: body({
          type: 'object',
          required: ['engineId', 'rule'],
          properties: { engineId: { type: 'integer' }, rule: { type: 'string' }, params: { type: 'object' }, from: { type: 'string' }, to: { type: 'string' } },
        }),
        responses: { '200': obj, ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
    '/api/admin/mail': {
      get: { summary: 'Messages the local mail catcher received, newest first (admin)', responses: { '200': obj, ...errors({ admin: true }) } },
    },
    '/api/admin/outbox': { get: { summary: 'Outgoing mail, sent and waiting, newest first (admin)', responses: { '200': obj, ...errors({ admin: true }) } } },
  },
  schemas: {
    Alarm: {
      type: 'object',
      required: ['id', 'engineId', 'rule', 'priority', 'state', 'raisedAt', 'value'],
      properties: {
        id: { type: 'integer' },
        engineId: { type: 'integer' },
        engineName: { type: ['string', 'null'] },
        siteId: { type: ['integer', 'null'] },
        rule: { type: 'string' },
        title: { type: 'string' },
        priority: { enum: ['low', 'medium', 'high', 'urgent'] },
        state: { enum: ['normal', 'unacknowledged', 'acknowledged', 'returned-unacknowledged', 'shelved', 'suppressed-by-design', 'out-of-service'] },
        active: { type: 'boolean' },
        raisedAt: { type: 'string', format: 'date-time' },
        value: { type: ['number', 'null'] },
        worstValue: { type: ['number', 'null'] },
        unit: { type: ['string', 'null'], description: 'degC, K (a temperature difference), kPa, uS/cm, degC/min, kPa/min' },
        message: { type: 'string' },
        acknowledgedAt: { type: ['string', 'null'] },
        shelvedUntil: { type: ['string', 'null'] },
        clearedAt: { type: ['string', 'null'] },
        closedAt: { type: ['string', 'null'] },
        escalationLevel: { type: 'integer', description: '0 on call, 1 backup, 2 planners' },
      },
    },
    OncallShift: {
      type: 'object',
      properties: {
        id: { type: 'integer' },
        siteId: { type: 'integer' },
        userId: { type: 'integer' },
        backupUserId: { type: ['integer', 'null'] },
        startsAt: { type: 'string' },
        endsAt: { type: 'string' },
      },
    },
    OncallShiftInput: {
      type: 'object',
      properties: {
        siteId: { type: 'integer' },
        userId: { type: 'integer' },
        backupUserId: { type: ['integer', 'null'] },
        startsAt: { type: 'string' },
        endsAt: { type: 'string' },
      },
    },
    RuleDefinition: {
      type: 'object',
      properties: {
        key: { type: 'string' },
        kind: { enum: ['limit', 'rate', 'no_data', 'stuck', 'boiling_margin', 'conductivity', 'heater_loss'] },
        channel: { type: 'string' },
        priority: { enum: ['low', 'medium', 'high', 'urgent'] },
        enabled: { type: 'boolean' },
        title: { type: 'string' },
        meaning: { type: 'string' },
        firstStep: { type: 'string' },
        params: { type: 'object' },
      },
    },
  },
};
