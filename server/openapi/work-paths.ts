import { body, errors, idParam, json, ref, type OpenApiGroup } from './helpers';

const stepParam = { name: 'stepId', in: 'path', required: true, schema: { type: 'integer', minimum: 1 } };
const status = { enum: ['requested', 'planned', 'in-progress', 'waiting-sign-off', 'closed', 'cancelled'] };
const kind = { enum: ['filter-change', 'coolant-test', 'drain-flush-refill', 'leak-check', 'top-up'] };
const priority = { enum: ['low', 'medium', 'high', 'urgent'] };
const condition = {
  type: 'object',
  properties: { name: { type: 'string' }, met: { type: 'boolean' }, value: {}, limit: {}, unit: { type: 'string' }, detail: { type: 'string' } },
};
const gateShut = json(
  {
    type: 'object',
    properties: {
      error: { type: 'string' },
      conditions: { type: 'array', items: condition },
      clearAt: { type: ['number', 'null'] },
      reasons: { type: 'array', items: { type: 'string' } },
      stale: { type: 'boolean' },
    },
  },
  'conflict: the opening check is not clear (unmet conditions), or the order is not in a state that allows this',
);

export const workPaths: OpenApiGroup = {
  tag: 'work orders',
  paths: {
    '/api/work-order-templates': {
      get: {
        summary: 'Checklists each kind of work order starts from',
        responses: { '200': json({ type: 'array', items: ref('WorkTemplate') }), ...errors() },
      },
    },
    '/api/engines/{id}/opening-check': {
      parameters: [idParam],
      get: {
        summary: 'May the cooling system be opened now? Stopped, cool, depressurised, fresh data, held; with a predicted clear time',
        parameters: [{ name: 'lockoutConfirmed', in: 'query', schema: { enum: ['true', 'false'] } }],
        responses: {
          '200': json({
            type: 'object',
            properties: {
              clear: { type: 'boolean' },
              conditions: { type: 'array', items: condition },
              clearAt: { type: ['number', 'null'], description: 'ms since epoch' },
              reasons: { type: 'array', items: { type: 'string' } },
              stale: { type: 'boolean' },
            },
          }),
          ...errors({ notFound: true }),
        },
      },
    },
    '/api/work-orders/assignees': {
      get: {
        summary: 'Active technicians a work order can be assigned to',
        responses: { '200': json({ type: 'array', items: { type: 'object' } }), ...errors() },
      },
    },
    '/api/work-orders': {
      get: {
        summary: 'Work orders',
        parameters: [
          { name: 'status', in: 'query', description: 'comma-separated', schema: { type: 'string' } },
          { name: 'engineId', in: 'query', schema: { type: 'integer' } },
          { name: 'assigneeId', in: 'query', schema: { type: 'integer' } },
          { name: 'siteId', in: 'query', schema: { type: 'integer' } },
          { name: 'mine', in: 'query', schema: { enum: ['1', 'true'] } },
        ],
        responses: { '200': json({ type: 'array', items: ref('WorkOrder') }), ...errors({ input: true }) },
      },
      post: {
        summary: 'Create a work order (planner/admin: planned; others: requested). With alarmId the alarm is linked and its data carried over',
        requestBody: body({
          type: 'object',
          required: ['engineId', 'kind'],
          properties: {
            engineId: { type: 'integer' },
            kind,
            alarmId: { type: 'integer' },
            title: { type: 'string' },
            description: { type: 'string' },
            priority,
            dueDate: { type: 'string', format: 'date' },
            assigneeId: { type: 'integer' },
            serviceTaskKey: {
              type: 'string',
              maxLength: 64,
              description: "the engine's service-plan task this order is for (the due list sends it); completing the order records that task done",
            },
          },
        }),
        responses: { '201': json(ref('WorkOrderDetail')), ...errors({ input: true, admin: true }) },
      },
    },
    '/api/work-orders/{id}': {
      parameters: [idParam],
      get: {
        summary: 'One work order with steps, parts, attachments, history and amendments',
        responses: { '200': json(ref('WorkOrderDetail')), ...errors({ notFound: true }) },
      },
      patch: {
        summary: 'Plan: assign, schedule, re-prioritise (planner/admin; not once waiting for sign-off or finished)',
        requestBody: body({
          type: 'object',
          properties: {
            title: { type: 'string' },
            description: { type: 'string' },
            priority,
            dueDate: { type: ['string', 'null'], format: 'date' },
            assigneeId: { type: ['integer', 'null'] },
          },
        }),
        responses: {
          '200': json(ref('WorkOrderDetail')),
          ...errors({ input: true, admin: true, notFound: true }),
          '409': json(ref('Error'), 'the order is no longer editable'),
        },
      },
    },
    '/api/work-orders/{id}/transition': {
      parameters: [idParam],
      post: {
        summary: 'Move to another status; allowed moves and roles are enforced, every move is in the history',
        requestBody: body({ type: 'object', required: ['to'], properties: { to: status, note: { type: 'string' } } }),
        responses: {
          '200': json(ref('WorkOrderDetail')),
          ...errors({ input: true, admin: true, notFound: true }),
          '409': json(ref('Error'), 'move not allowed from this status'),
        },
      },
    },
    '/api/work-orders/{id}/steps/{stepId}': {
      parameters: [idParam, stepParam],
      patch: {
        summary:
          'Save a draft of a step (assigned technician) without completing it: the value as typed with its unit, and the remark. Completing keeps them. A locked gated step (opening check not clear) takes nothing: 409',
        requestBody: body({ type: 'object', properties: { value: { type: ['number', 'null'] }, unit: { type: 'string' }, note: { type: 'string' } } }),
        responses: { '200': json(ref('WorkOrderDetail')), ...errors({ input: true, admin: true, notFound: true }), '409': gateShut },
      },
    },
    '/api/work-orders/{id}/coolant-test': {
      parameters: [idParam],
      post: {
        summary:
          'Record the coolant test of a coolant-test work order from its steps, once per order and only after the sampling step is done. A second attempt answers 409 with the recorded test; a correction is an amendment',
        requestBody: body({ type: 'object', properties: { method: { enum: ['strip', 'refractometer', 'lab'] } } }),
        responses: {
          '201': json({ type: 'object', properties: { coolantTest: { type: 'object' }, order: ref('WorkOrderDetail') } }),
          ...errors({ input: true, admin: true, notFound: true }),
          '409': json({ type: 'object', properties: { error: { type: 'string' }, coolantTest: { type: 'object' } } }),
        },
      },
    },
    '/api/work-orders/{id}/steps/{stepId}/complete': {
      parameters: [idParam, stepParam],
      post: {
        summary:
          'Do a step (assigned technician). Gated steps need lockout confirmation and a clear opening check, re-computed here; a manual check is accepted only when live data is stale or missing. A step that adds coolant waits for the step that takes the cap off (409 "do step N first")',
        requestBody: body({
          type: 'object',
          properties: {
            value: { type: 'number' },
            unit: { type: 'string' },
            note: { type: 'string' },
            lockoutConfirmed: { type: 'boolean' },
            topUp: {
              type: 'object',
              description: 'the top-up step of a top-up order only: what was added (value = volume, L or gal); recorded as a coolant top-up',
              required: ['liquid'],
              properties: { liquid: { enum: ['water', 'premix', 'glycol'] }, premixPercent: { type: ['number', 'null'] } },
            },
            manualCheck: {
              type: 'object',
              required: ['gaugeKpa', 'tempC', 'minutesSinceStop', 'checkedBy', 'reason'],
              properties: {
                gaugeKpa: { type: 'number' },
                tempC: { type: 'number' },
                minutesSinceStop: { type: 'number' },
                checkedBy: { type: 'string' },
                reason: { type: 'string' },
              },
            },
          },
        }),
        responses: { '200': json(ref('WorkOrderDetail')), ...errors({ input: true, admin: true, notFound: true }), '409': gateShut },
      },
    },
    '/api/work-orders/{id}/parts': {
      parameters: [idParam],
      post: {
        summary: 'Record a part or fluid (filters in pcs; coolant and additive in L or gal, stored in L)',
        requestBody: body({
          type: 'object',
          required: ['kind', 'quantity', 'unit'],
          properties: {
            kind: { enum: ['filter-charged', 'filter-blank', 'additive', 'coolant', 'other'] },
            description: { type: 'string' },
            quantity: { type: 'number' },
            unit: { enum: ['L', 'gal', 'pcs'] },
          },
        }),
        responses: {
          '201': json(ref('WorkOrderDetail')),
          ...errors({ input: true, admin: true, notFound: true }),
          '409': json(ref('Error'), 'the order is no longer editable'),
        },
      },
    },
    '/api/work-orders/{id}/amendments': {
      parameters: [idParam],
      post: {
        summary: 'Append an amendment to a closed or cancelled order (the record itself is never edited)',
        requestBody: body({ type: 'object', required: ['text'], properties: { text: { type: 'string' } } }),
        responses: {
          '201': json(ref('WorkOrderDetail')),
          ...errors({ input: true, admin: true, notFound: true }),
          '409': json(ref('Error'), 'the order is still open'),
        },
      },
    },
    '/api/work-orders/{id}/attachments': {
      parameters: [idParam],
      post: {
        summary: 'Attach a photo (JPEG, PNG, WebP) or PDF, at most 8 MB, checked by content',
        requestBody: {
          required: true,
          content: {
            'multipart/form-data': {
              schema: { type: 'object', required: ['file'], properties: { file: { type: 'string', format: 'binary' }, stepId: { type: 'integer' } } },
            },
          },
        },
        responses: {
          '201': json({ type: 'object' }),
          ...errors({ input: true, admin: true, notFound: true }),
          '413': json(ref('Error'), 'file too large'),
          '415': json(ref('Error'), 'not a photo or PDF by content'),
        },
      },
    },
    '/api/attachments/{id}': {
      parameters: [idParam],
      get: {
        summary: 'The attached file (signed-in users only)',
        responses: {
          '200': { description: 'the file', content: { 'image/jpeg': {}, 'image/png': {}, 'image/webp': {}, 'application/pdf': {} } },
          ...errors({ notFound: true }),
        },
      },
    },
  },
  schemas: {
    WorkTemplate: {
      type: 'object',
      properties: {
        kind,
        title: { type: 'string' },
        steps: {
          type: 'array',
          items: {
            type: 'object',
            properties: {
              key: { type: 'string' },
              title: { type: 'string' },
              input: { enum: ['value', 'photo', 'confirmation'] },
              unit: { type: 'string' },
              gated: { type: 'boolean' },
              optional: { type: 'boolean' },
              caution: { type: 'string' },
              after: { type: 'array', items: { type: 'string' }, description: 'keys of earlier steps that must be done first' },
            },
          },
        },
        cautions: { type: 'array', items: { type: 'object' } },
      },
    },
    WorkOrder: {
      type: 'object',
      properties: {
        id: { type: 'integer' },
        engineId: { type: 'integer' },
        kind,
        title: { type: 'string' },
        status,
        priority,
        dueDate: { type: ['string', 'null'] },
        assigneeId: { type: ['integer', 'null'] },
        alarmIds: { type: 'array', items: { type: 'integer' } },
        stepsDone: { type: 'integer' },
        stepsTotal: { type: 'integer' },
        manualChecks: { type: 'integer' },
      },
    },
    WorkOrderDetail: {
      allOf: [
        ref('WorkOrder'),
        {
          type: 'object',
          properties: {
            steps: { type: 'array', items: { type: 'object' } },
            parts: { type: 'array', items: { type: 'object' } },
            attachments: { type: 'array', items: { type: 'object' } },
            history: { type: 'array', items: { type: 'object' } },
            amendments: { type: 'array', items: { type: 'object' } },
            cautions: { type: 'array', items: { type: 'object' } },
          },
        },
      ],
    },
  },
};
