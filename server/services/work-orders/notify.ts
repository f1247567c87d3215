import type { AppContext } from '../../app-context';
import type { Telemetry } from '../../telemetry/types';
import type { WorkOrder } from '../../models/work-order';

/** Live push of a changed work order to everyone watching the fleet or that engine. */
export function pushWorkOrder(ctx: AppContext, order: WorkOrder, change: string): void {
  const emit = (ctx.telemetry as Partial<Telemetry> | null)?.emit;
  if (!emit) return;
  const payload = { id: order.id, engineId: order.engineId, status: order.status, change, at: new Date().toISOString() };
  try {
    emit('fleet', 'work-order', payload);
    emit(`engine:${order.engineId}`, 'work-order', payload);
  } catch (err) {
    ctx.log.warn('work orders: live push failed', err instanceof Error ? err.message : err);
  }
}

/**
 * Tell the planners by e-mail through the outbox (delivered and retried by the outbox sender), and
 * live to the fleet room. Returns the addresses queued.
 */
export async function tellPlanners(ctx: AppContext, subject: string, text: string, extra: { order: WorkOrder; event: string }): Promise<string[]> {
  const planners = await ctx.models.User.findAll({ where: { role: 'planner', disabled: false }, attributes: ['id', 'email'] });
  const to = planners.map((p) => p.email);
  if (to.length) {
    await ctx.models.OutboxMessage.create({ to: to.join(', '), subject, text, html: null, alarmId: null, nextAttemptAt: new Date() });
  }
  const emit = (ctx.telemetry as Partial<Telemetry> | null)?.emit;
  try {
    emit?.('fleet', 'work-order-notice', { id: extra.order.id, engineId: extra.order.engineId, event: extra.event, subject });
  } catch {
    /* the e-mail and the audit entry are the record; the push is a courtesy */
  }
  return to;
}
