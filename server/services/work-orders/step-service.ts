import { toCelsius, toKpa, type PressureUnit, type TemperatureUnit } from '../../../shared/units';
import { LITRES_PER_US_GALLON } from '../../../shared/units';
import { badRequest, conflict, HttpError, notFound } from '../../http-error';
import type { ManualCheck } from '../../models/work-order-step';
import type { AuthUser } from '../../telemetry/types';
import { workTemplate } from '../work-templates';
import { LOCK_STEP_KEYS, lockoutFor, UNLOCK_STEP_KEYS } from '../../../shared/work/lockout';
import { isTopUpStep } from '../../../shared/work/top-up-step';
import { waitingFor, waitingText } from '../../../shared/work/step-order';
import type { TopUpLiquid } from '../../models/coolant-models';
import { checkTopUp, recordTopUp } from '../coolant/top-ups';
import { computeGate, liveObjections, type GateResult } from './gate';
import { pushWorkOrder, tellPlanners } from './notify';
import type { WorkOrderService } from './work-order-service';

export interface CompleteInput {
  value?: number;
  unit?: string;
  note?: string;
  lockoutConfirmed?: boolean;
  manualCheck?: ManualCheck;
  /** The top-up step of a top-up order: what was added (the volume is the step's value). */
  topUp?: { liquid: TopUpLiquid; premixPercent: number | null };
}

/** The answer to a gated step while the opening check is not clear: 409 with the unmet conditions. */
export class GateShutError extends HttpError {
  constructor(
    message: string,
    readonly body: Record<string, unknown>,
  ) {
    super(409, message);
  }
}

/** Plausible ranges of a recorded value, in the step's unit (common practice; wide on purpose). */
const RANGES: Record<string, [number, number]> = {
  degC: [-80, 20],
  kPa: [-10, 400],
  L: [0, 5000],
  turns: [0, 3],
  '%': [0, 100],
  'units/gal': [0, 10],
  pH: [0, 14],
};

/** Converts a value entered in another unit of the same quantity to the step's unit. */
function toStepUnit(value: number, from: string, stepUnit: string): number | null {
  if (from === stepUnit) return value;
  if (stepUnit === 'degC' && (from === 'degF' || from === 'K')) return toCelsius(value, from as TemperatureUnit);
  if (stepUnit === 'kPa' && (from === 'psi' || from === 'bar')) return toKpa(value, from as PressureUnit);
  if (stepUnit === 'L' && from === 'gal') return value * LITRES_PER_US_GALLON;
  return null;
}

function snapshot(g: GateResult, at: Date, manual: boolean): Record<string, unknown> {
  return { at: at.toISOString(), clear: g.clear, stale: g.stale, manual, conditions: g.conditions, reasons: g.reasons };
}

/**
 * Lockout/tagout for a gated step: confirmed once, on the step that says to lock out, and carried to the
 * gated steps after it until a step that takes the lock off is done (shared/work/lockout.ts).
 */
export async function lockoutCarried(svc: WorkOrderService, orderId: number, gated: { position: number }): Promise<boolean> {
  const steps = await svc.models.WorkOrderStep.findAll({
    where: { workOrderId: orderId, key: [...LOCK_STEP_KEYS, ...UNLOCK_STEP_KEYS] },
    attributes: ['key', 'position', 'doneAt'],
  });
  return (
    lockoutFor(
      steps.map((s) => ({ key: s.key, position: s.position, doneAt: s.doneAt ?? null })),
      gated,
    ) !== null
  );
}

/** The step of an order the assigned technician may work on now (in progress, not done). */
async function workableStep(svc: WorkOrderService, user: AuthUser, orderId: number, stepId: number) {
  const order = await svc.getOrder(orderId);
  const step = await svc.models.WorkOrderStep.findOne({ where: { id: stepId, workOrderId: orderId } });
  if (!step) throw notFound('step');
  if (order.status !== 'in-progress') throw conflict('steps are done while the work order is in progress; start it first');
  if (user.role !== 'technician') throw new HttpError(403, 'steps are done by the technician');
  if (order.assigneeId !== user.id) throw new HttpError(403, 'this work order is assigned to another technician');
  if (step.doneAt) throw conflict('this step is already done');
  return { order, step };
}

export interface DraftInput {
  value?: number | null;
  unit?: string;
  note?: string;
}

/**
 * Saves what is typed into a step without completing it: the value as entered (with its unit, so the
 * technician sees it as typed after a reload) and the remark. A locked gated step takes nothing (409).
 */
export async function saveDraft(svc: WorkOrderService, user: AuthUser, orderId: number, stepId: number, input: DraftInput) {
  const { order, step } = await workableStep(svc, user, orderId, stepId);
  if (step.gated) {
    const engine = await svc.models.Engine.findByPk(order.engineId);
    if (!engine) throw notFound('engine');
    const lockout = await lockoutCarried(svc, orderId, step);
    const gate = await computeGate(svc.history, engine, lockout);
    if (!gate.clear) {
      const why = lockout ? 'this step is locked: the opening check is not clear' : 'this step is locked: confirm lockout/tagout on its step first';
      throw new GateShutError(why, {
        error: why,
        conditions: gate.conditions.filter((c) => !c.met),
        clearAt: gate.clearAt,
        reasons: gate.reasons,
        stale: gate.stale,
      });
    }
  }
  const patch: Record<string, unknown> = {};
  if (input.value !== undefined) {
    if (step.input !== 'value') throw badRequest('this step records no value', 'value');
    const stepUnit = step.unit ?? '';
    const unit = input.unit ?? step.resultUnit ?? stepUnit;
    if (toStepUnit(1, unit, stepUnit) === null) throw badRequest(`unit must be ${[stepUnit, ...(ENTRY_UNITS[stepUnit] ?? [])].join(', ')}`, 'unit');
    patch.resultValue = input.value;
    patch.resultUnit = input.value === null ? null : unit;
  } else if (input.unit !== undefined) {
    if (step.input !== 'value' || toStepUnit(1, input.unit, step.unit ?? '') === null) throw badRequest(`unit must be ${step.unit ?? 'none'}`, 'unit');
    patch.resultUnit = input.unit;
  }
  if (input.note !== undefined) patch.resultText = input.note.trim() || null;
  if (Object.keys(patch).length) await step.update(patch);
  pushWorkOrder(svc.ctx, order, 'draft');
  return step;
}

/** Other units a step's value may be typed in (the server converts on completion). */
const ENTRY_UNITS: Record<string, string[]> = { degC: ['degF', 'K'], kPa: ['psi', 'bar'], L: ['gal'] };

export async function completeStep(svc: WorkOrderService, user: AuthUser, orderId: number, stepId: number, input: CompleteInput) {
  const { models } = svc;
  const { order, step } = await workableStep(svc, user, orderId, stepId);

  // coolant goes in only once the step that takes the cap off is done (it waits for the opening check)
  const after = workTemplate(order.kind)?.steps.find((t) => t.key === step.key)?.after;
  if (after?.length) {
    const earlier = await models.WorkOrderStep.findAll({
      where: { workOrderId: orderId, key: [...after] },
      attributes: ['key', 'position', 'title', 'doneAt'],
    });
    const first = waitingFor(
      earlier.map((s) => ({ key: s.key, position: s.position, title: s.title, doneAt: s.doneAt ?? null })),
      after,
    );
    if (first) throw conflict(waitingText(first));
  }

  // what is not sent again is taken from the draft, so completing keeps what was typed
  const note = input.note !== undefined ? input.note : (step.resultText ?? undefined);
  const entered =
    input.value !== undefined
      ? { value: input.value, unit: input.unit }
      : step.resultValue !== null && step.resultValue !== undefined
        ? { value: step.resultValue, unit: step.resultUnit ?? undefined }
        : null;
  const patch: Record<string, unknown> = { resultText: note?.trim() || null };
  if (step.input === 'value') {
    if (!entered) throw badRequest('this step records a value', 'value');
    const stepUnit = step.unit ?? '';
    const v = toStepUnit(entered.value, entered.unit ?? stepUnit, stepUnit);
    if (v === null) throw badRequest(`unit must be ${stepUnit}`, 'unit');
    const range = workTemplate(order.kind)?.steps.find((t) => t.key === step.key)?.range ?? RANGES[stepUnit];
    if (range && (v < range[0] || v > range[1])) throw badRequest(`value must be between ${range[0]} and ${range[1]} ${stepUnit}`, 'value');
    patch.resultValue = v;
    patch.resultUnit = stepUnit;
  } else {
    patch.resultValue = null;
    patch.resultUnit = null;
  }
  if (step.input === 'photo') {
    const photos = await models.Attachment.count({ where: { workOrderId: orderId, stepId: step.id } });
    if (!photos) throw badRequest('attach a photo to this step first', 'photo');
  }

  // the top-up step records the coolant added through the top-up service (same checks, same transaction as the step)
  const topUpStep = isTopUpStep(order.kind, step.key);
  if (input.topUp && !topUpStep) throw badRequest('only the top-up step of a top-up order records a top-up', 'topUp');
  if (topUpStep) {
    if (!input.topUp) throw badRequest('say what was added: water, premix or glycol', 'liquid');
    await checkTopUp(
      models,
      order.engineId,
      { volumeL: patch.resultValue as number, liquid: input.topUp.liquid, premixPercent: input.topUp.premixPercent },
      'value',
    );
    // the step's record says what was added, before the technician's remark
    const what =
      input.topUp.liquid === 'premix' ? `Premix, ${input.topUp.premixPercent} % glycol` : input.topUp.liquid === 'water' ? 'Plain water' : 'Glycol concentrate';
    patch.resultText = `${what}${note?.trim() ? `: ${note.trim()}` : ''}`.slice(0, 2000);
  }

  const now = new Date();
  let manual = false;
  if (step.gated) {
    const engine = await models.Engine.findByPk(order.engineId);
    if (!engine) throw notFound('engine');
    const lockout = input.lockoutConfirmed === true || (await lockoutCarried(svc, orderId, step));
    const gate = await computeGate(svc.history, engine, lockout, now.getTime());
    if (!lockout) {
      throw new GateShutError('confirm lockout/tagout before this step', {
        error: 'confirm lockout/tagout before this step',
        conditions: gate.conditions.filter((c) => !c.met),
        clearAt: gate.clearAt,
        reasons: gate.reasons,
        stale: gate.stale,
      });
    }
    if (!gate.clear) {
      const objections = liveObjections(gate, now.getTime());
      if (!input.manualCheck || !gate.stale || objections.length) {
        const why = !input.manualCheck
          ? 'the opening check is not clear'
          : !gate.stale
            ? 'a manual check is only for stale or missing live data; live data is fresh'
            : 'live data says the system is not safe to open: a manual check cannot overrule it';
        throw new GateShutError(why, {
          error: why,
          conditions: gate.conditions.filter((c) => !c.met),
          clearAt: gate.clearAt,
          reasons: gate.reasons,
          stale: gate.stale,
          objections,
        });
      }
      // the hand readings must themselves pass the same limits
      const m = input.manualCheck;
      const s = gate.settings;
      const failed = [
        { name: 'manual-pressure', met: m.gaugeKpa <= s.maxPressureKpa, value: m.gaugeKpa, limit: s.maxPressureKpa, unit: 'kPa' },
        { name: 'manual-temperature', met: m.tempC <= s.safeOpenTempC, value: m.tempC, limit: s.safeOpenTempC, unit: '°C' },
        { name: 'manual-stopped', met: m.minutesSinceStop * 60 >= s.minStoppedS, value: m.minutesSinceStop, limit: s.minStoppedS / 60, unit: 'min' },
      ].filter((c) => !c.met);
      if (failed.length)
        throw new GateShutError('the manual check readings are not safe to open', {
          error: 'the manual check readings are not safe to open',
          conditions: failed,
          clearAt: null,
          reasons: [],
          stale: true,
        });
      manual = true;
      patch.manualCheck = m;
    }
    patch.lockoutConfirmed = true;
    patch.gateSnapshot = snapshot(gate, now, manual);
  }
  // the lock-out step is where lockout/tagout is confirmed
  if (LOCK_STEP_KEYS.includes(step.key)) patch.lockoutConfirmed = true;
  patch.doneAt = now;
  patch.doneBy = user.id;

  await svc.ctx.sequelize.transaction(async (transaction) => {
    await step.update(patch, { transaction });
    const topUp =
      topUpStep && input.topUp
        ? await recordTopUp(
            models,
            order.engineId,
            {
              addedAt: now,
              volumeL: patch.resultValue as number,
              liquid: input.topUp.liquid,
              premixPercent: input.topUp.premixPercent,
              notes: `Work order #${order.id}${note?.trim() ? `: ${note.trim().slice(0, 400)}` : ''}`,
            },
            user.id,
            { transaction, workOrderId: order.id },
          )
        : null;
    await svc.event(
      orderId,
      user.id,
      manual ? 'step-done-manual-check' : 'step-done',
      {
        note: (patch.resultText as string | null) ?? null,
        details: {
          stepId: step.id,
          key: step.key,
          value: patch.resultValue ?? null,
          unit: patch.resultUnit ?? null,
          entered: entered ? { value: entered.value, unit: entered.unit ?? step.unit } : null,
          manualCheck: manual ? input.manualCheck! : null,
          ...(topUp ? { topUp: { id: topUp.id, volumeL: topUp.volumeL, liquid: topUp.liquid, premixPercent: topUp.premixPercent } } : {}),
        },
      },
      transaction,
    );
    if (manual) {
      await svc.audit(
        user.id,
        'opening-check-manual-override',
        'work_order_step',
        step.id,
        { workOrderId: orderId, engineId: order.engineId, manualCheck: input.manualCheck!, gate: patch.gateSnapshot as Record<string, unknown> },
        transaction,
      );
    }
  });
  if (manual) {
    const m = input.manualCheck!;
    const engine = await models.Engine.findByPk(order.engineId, { attributes: ['id', 'name'] });
    const to = await tellPlanners(
      svc.ctx,
      `Manual opening check on work order #${order.id} (${engine?.name ?? `engine ${order.engineId}`})`,
      `${user.email} opened the cooling system on a manual check because live data was stale or missing.\n\n` +
        `Step: ${step.title}\nGauge: ${m.gaugeKpa} kPa\nCoolant: ${m.tempC} °C\nStopped for: ${m.minutesSinceStop} min\nChecked by: ${m.checkedBy}\nReason: ${m.reason}\n\n` +
        `Work order: ${svc.ctx.config.publicUrl}/work/${order.id}`,
      { order, event: 'manual-check' },
    );
    await svc.audit(user.id, 'planners-told', 'work_order_step', step.id, { to, channel: to.length ? 'e-mail' : 'live push only' });
  }
  pushWorkOrder(svc.ctx, order, 'step');
  return step;
}
