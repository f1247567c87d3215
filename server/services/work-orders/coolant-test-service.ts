import { toCelsius, type TemperatureUnit } from '../../../shared/units';
import { conflict, HttpError } from '../../http-error';
import type { TestMethod } from '../../models/coolant-models';
import type { WorkOrderStep } from '../../models/work-order-step';
import type { AuthUser } from '../../telemetry/types';
import { coolantTestView, recordCoolantTest, type CoolantTestView } from '../coolant/coolant-tests';
import { pushWorkOrder } from './notify';
import { isPlanner, type WorkOrderService } from './work-order-service';

/** The step whose sample the test reads: it must be done before a test is recorded from the order. */
export const SAMPLE_STEP_KEY = 'take-sample';

/** A second attempt: 409 with the test already recorded, so the client shows it instead of offering again. */
export class AlreadyRecordedError extends HttpError {
  constructor(readonly coolantTest: CoolantTestView | null) {
    super(409, 'a coolant test was already recorded from this work order; a correction is an amendment');
  }
}

/** A step's reading in the step's unit: the done result, else the draft as typed (converted). */
function reading(steps: WorkOrderStep[], key: string): number | null {
  const s = steps.find((x) => x.key === key);
  if (!s || s.resultValue === null || s.resultValue === undefined) return null;
  if (s.doneAt || !s.resultUnit || s.resultUnit === s.unit) return s.resultValue;
  if (s.unit === 'degC' && (s.resultUnit === 'degF' || s.resultUnit === 'K')) return toCelsius(s.resultValue, s.resultUnit as TemperatureUnit);
  return null;
}

/**
 * Records the coolant test of a coolant-test work order from its steps, once per order, and only after
 * the sample was taken (its step done: that step is the gated one, so the sample came out of a system
 * that was safe to open). There is no undo: a wrong test is corrected by an amendment to the record.
 */
export async function recordOrderCoolantTest(svc: WorkOrderService, user: AuthUser, orderId: number, method: TestMethod = 'strip'): Promise<CoolantTestView> {
  const order = await svc.getOrder(orderId);
  if (order.coolantTestId) throw new AlreadyRecordedError(await coolantTestView(svc.models, order.coolantTestId));
  if (order.kind !== 'coolant-test') throw conflict('only a coolant-test work order records a coolant test');
  const assignee = user.role === 'technician' && order.assigneeId === user.id && order.status === 'in-progress';
  const planner = isPlanner(user) && ['in-progress', 'waiting-sign-off'].includes(order.status);
  if (!assignee && !planner) throw new HttpError(403, 'the assigned technician (or a planner) records the test while the work is open');
  const steps = await svc.models.WorkOrderStep.findAll({ where: { workOrderId: orderId } });
  const sample = steps.find((s) => s.key === SAMPLE_STEP_KEY);
  if (sample && !sample.doneAt) throw conflict('take the sample first: its step is not done');
  const values = {
    scaUnitsPerGal: reading(steps, 'sca-level'),
    glycolPercent: reading(steps, 'glycol-percent'),
    freezePointC: reading(steps, 'freeze-point'),
    ph: reading(steps, 'ph'),
    nitritePpm: reading(steps, 'nitrite'),
    molybdatePpm: reading(steps, 'molybdate'),
  };
  if (values.scaUnitsPerGal === null && values.glycolPercent === null && values.freezePointC === null && values.nitritePpm === null) {
    throw new HttpError(400, 'enter at least the freeze point, glycol, additive level or nitrite in its step', 'steps');
  }
  const test = await recordCoolantTest(
    svc.models,
    order.engineId,
    {
      testedAt: sample?.doneAt ? new Date(sample.doneAt) : new Date(),
      method,
      ...values,
      conductivityUsCm: null,
      appearance: null,
      notes: `From work order #${order.id}`,
    },
    user.id,
  );
  // once per order, also under a race: only the first writer links its test; a loser removes its own
  await svc.ctx.sequelize.query('UPDATE work_orders SET coolant_test_id = ? WHERE id = ? AND coolant_test_id IS NULL', { replacements: [test.id, order.id] });
  const winner = (await svc.getOrder(orderId)).coolantTestId;
  if (winner !== test.id) {
    await svc.models.CoolantTest.destroy({ where: { id: test.id } });
    throw new AlreadyRecordedError(winner ? await coolantTestView(svc.models, winner) : null);
  }
  await svc.event(order.id, user.id, 'coolant-test-recorded', { details: { coolantTestId: test.id, ...values } });
  pushWorkOrder(svc.ctx, order, 'coolant-test');
  return test;
}
