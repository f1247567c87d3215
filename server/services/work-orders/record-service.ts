import { conflict, HttpError } from '../../http-error';
import type { PartKind } from '../../models/work-order-part';
import type { AuthUser } from '../../telemetry/types';
import { LITRES_PER_US_GALLON } from '../../../shared/units';
import { pushWorkOrder } from './notify';
import { FINISHED } from './transitions';
import type { WorkOrderService } from './work-order-service';

export interface PartInput {
  kind: PartKind;
  description?: string;
  quantity: number;
  /** Fluids in L or gal (stored in L); filters and other parts as pcs. */
  unit: 'L' | 'gal' | 'pcs';
}

const FLUIDS: readonly PartKind[] = ['additive', 'coolant'];

export async function addPart(svc: WorkOrderService, user: AuthUser, orderId: number, input: PartInput) {
  const order = await svc.getOrder(orderId);
  svc.assertEditable(order);
  if (user.role === 'operator') throw new HttpError(403, 'operators do not record parts');
  const fluid = FLUIDS.includes(input.kind);
  if (fluid && input.unit === 'pcs') throw new HttpError(400, 'a fluid is recorded in L or gal', 'unit');
  if (!fluid && input.unit !== 'pcs') throw new HttpError(400, 'a filter or part is recorded in pcs', 'unit');
  const quantity = input.unit === 'gal' ? input.quantity * LITRES_PER_US_GALLON : input.quantity;
  const part = await svc.ctx.sequelize.transaction(async (transaction) => {
    const p = await svc.models.WorkOrderPart.create(
      { workOrderId: orderId, kind: input.kind, description: input.description?.trim() || null, quantity, unit: fluid ? 'L' : 'pcs', addedBy: user.id },
      { transaction },
    );
    await svc.event(
      orderId,
      user.id,
      'part-added',
      { details: { partId: p.id, kind: p.kind, quantity, unit: p.unit, description: p.description } },
      transaction,
    );
    return p;
  });
  pushWorkOrder(svc.ctx, order, 'part');
  return part;
}

/** A closed (or cancelled) record is never edited: what is learned later is appended, with author and time. */
export async function addAmendment(svc: WorkOrderService, user: AuthUser, orderId: number, text: string) {
  const order = await svc.getOrder(orderId);
  if (!FINISHED.includes(order.status)) throw conflict('amendments are for closed or cancelled work orders; while open, use the steps and notes');
  if (user.role === 'operator') throw new HttpError(403, 'operators do not amend service records');
  const a = await svc.ctx.sequelize.transaction(async (transaction) => {
    const row = await svc.models.Amendment.create({ workOrderId: orderId, text: text.trim(), authorId: user.id }, { transaction });
    await svc.event(orderId, user.id, 'amended', { details: { amendmentId: row.id } }, transaction);
    await svc.audit(user.id, 'work-order-amended', 'work_order', orderId, { amendmentId: row.id }, transaction);
    return row;
  });
  pushWorkOrder(svc.ctx, order, 'amendment');
  return a;
}
