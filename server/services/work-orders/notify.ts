import type { AppContext } from '../../app-context';
import type { Telemetry } from '../../telemetry/types';
import type { WorkOrder } from '../../models/work-order';

/**
 * Rooms that may see an engine's work-order events: the whole fleet (users of every site), the
 * engine's site (users limited to sites join only their own site rooms) and the engine itself.
 */
async function workOrderRooms(ctx: AppContext, engineId: number): Promise<string[]> {
  const engine = await ctx.models.Engine.findByPk(engineId, { attributes: ['id', 'siteId'] });
  return ['fleet', `engine:${engineId}`, ...(engine ? [`site:${engine.siteId}`] : [])];
}

/** Emit to the rooms of the order's engine, each socket once; never throws (the push is a courtesy). */
function emitForEngine(ctx: AppContext, engineId: number, event: string, payload: unknown): void {
  const emit = (ctx.telemetry as Partial<Telemetry> | null)?.emit;
  if (!emit) return;
  workOrderRooms(ctx, engineId)
    .then((rooms) => emit(rooms, event, payload))
    .catch((err) => {
      ctx.log.warn('work orders: live push failed', err instanceof Error ? err.message : err);
    });
}

/** Live push of a changed work order to those watching the fleet, the engine's site or the engine, within their sites. */
export function pushWorkOrder(ctx: AppContext, order: WorkOrder, change: string): void {
  emitForEngine(ctx, order.engineId, 'work-order', { id: order.id, engineId: order.engineId, status: order.status, change, at: new Date().toISOString() });
}

/**
 * Tell the planners by e-mail through the outbox (delivered and retried by the outbox sender), and
 * live to those who may see the engine. Returns the addresses queued.
 */
export async function tellPlanners(ctx: AppContext, subject: string, text: string, extra: { order: WorkOrder; event: string }): Promise<string[]> {
  const planners = await ctx.models.User.findAll({ where: { role: 'planner', disabled: false }, attributes: ['id', 'email'] });
  const to = planners.map((p) => p.email);
  if (to.length) {
    await ctx.models.OutboxMessage.create({ to: to.join(', '), subject, text, html: null, alarmId: null, nextAttemptAt: new Date() });
  }
  // the e-mail and the audit entry are the record; the push is a courtesy, within the watchers' sites
  emitForEngine(ctx, extra.order.engineId, 'work-order-notice', { id: extra.order.id, engineId: extra.order.engineId, event: extra.event, subject });
  return to;
}
