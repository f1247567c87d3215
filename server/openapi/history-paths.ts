import { errors, idParam, json, type Json, type OpenApiGroup } from './helpers';

const obj = (properties: Json): Json => ({ type: 'object', properties });
const arr = (items: Json): Json => ({ type: 'array', items });
const str: Json = { type: 'string' };
const strOrNull: Json = { type: ['string', 'null'] };
const numOrNull: Json = { type: ['number', 'null'] };

const workOrder = obj({
  id: { type: 'integer' },
  kind: str,
  kindTitle: str,
  title: str,
  status: str,
  priority: str,
  at: { type: 'string', format: 'date-time', description: 'closed, else completed, else started, else created: the sort key' },
  createdAt: str,
  startedAt: strOrNull,
  completedAt: strOrNull,
  signedOffAt: strOrNull,
  closedAt: strOrNull,
  assigneeName: strOrNull,
  signedOffByName: strOrNull,
  doneByNames: arr(str),
  parts: arr(obj({ kind: str, description: strOrNull, quantity: { type: 'number' }, unit: { enum: ['L', 'pcs'] } })),
  manualChecks: { type: 'integer' },
  manualCheckSteps: arr(
    obj({
      stepId: { type: 'integer' },
      stepTitle: str,
      gaugeKpa: { type: 'number' },
      tempC: { type: 'number' },
      minutesSinceStop: { type: 'number' },
      checkedBy: str,
      reason: str,
      doneAt: strOrNull,
      doneByName: strOrNull,
    }),
  ),
  resets: arr(obj({ event: { enum: ['baseline-reset', 'baseline-pending'] }, at: str, note: strOrNull, details: { type: ['object', 'null'] } })),
});

export const historyOpenApi: OpenApiGroup = {
  tag: 'service history',
  paths: {
    '/api/engines/{id}/history': {
      parameters: [idParam],
      get: {
        summary:
          "An engine's service history, newest first: work orders (open and closed, with parts, fluids and manual-check overrides), coolant tests with their decisions, run-hours corrections and service events",
        responses: {
          '200': json(
            obj({
              engine: obj({
                id: { type: 'integer' },
                name: str,
                siteId: { type: 'integer' },
                siteName: strOrNull,
                duty: str,
                capacityL: { type: 'number' },
                coolantFamily: str,
                glycolType: str,
                glycolPercent: { type: 'number' },
                runHours: { type: 'number' },
                retiredAt: strOrNull,
              }),
              generatedAt: { type: 'string', format: 'date-time' },
              workOrders: arr(workOrder),
              coolantTests: arr({ type: 'object', description: 'as GET /api/engines/{id}/coolant-tests' }),
              runHoursAdjustments: arr(
                obj({ id: { type: 'integer' }, oldRunHours: { type: 'number' }, newRunHours: { type: 'number' }, userName: strOrNull, reason: str, at: str }),
              ),
              serviceEvents: arr(
                obj({
                  id: { type: 'integer' },
                  taskKey: str,
                  taskTitle: str,
                  doneAt: str,
                  runHours: numOrNull,
                  workOrderId: { type: ['integer', 'null'] },
                  workOrderTitle: strOrNull,
                }),
              ),
            }),
          ),
          ...errors({ notFound: true }),
        },
      },
    },
  },
};
