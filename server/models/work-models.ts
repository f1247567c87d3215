import type { Sequelize } from 'sequelize';
import { Amendment, initAmendment } from './amendment';
import { Attachment, initAttachment } from './attachment';
import { AuditEntry, initAuditEntry } from './audit-entry';
import { ServiceEvent, initServiceEvent } from './service-event';
import { WorkOrder, initWorkOrder } from './work-order';
import { WorkOrderAlarm, initWorkOrderAlarm } from './work-order-alarm';
import { WorkOrderEvent, initWorkOrderEvent } from './work-order-event';
import { WorkOrderPart, initWorkOrderPart } from './work-order-part';
import { WorkOrderStep, initWorkOrderStep } from './work-order-step';

/** Models of the work-orders issue (migration 0003). */
export interface WorkModels {
  WorkOrder: typeof WorkOrder;
  WorkOrderAlarm: typeof WorkOrderAlarm;
  WorkOrderStep: typeof WorkOrderStep;
  WorkOrderEvent: typeof WorkOrderEvent;
  WorkOrderPart: typeof WorkOrderPart;
  Attachment: typeof Attachment;
  Amendment: typeof Amendment;
  AuditEntry: typeof AuditEntry;
  ServiceEvent: typeof ServiceEvent;
}

export function initWorkModels(sequelize: Sequelize): WorkModels {
  const m: WorkModels = {
    WorkOrder: initWorkOrder(sequelize),
    WorkOrderAlarm: initWorkOrderAlarm(sequelize),
    WorkOrderStep: initWorkOrderStep(sequelize),
    WorkOrderEvent: initWorkOrderEvent(sequelize),
    WorkOrderPart: initWorkOrderPart(sequelize),
    Attachment: initAttachment(sequelize),
    Amendment: initAmendment(sequelize),
    AuditEntry: initAuditEntry(sequelize),
    ServiceEvent: initServiceEvent(sequelize),
  };
  m.WorkOrder.hasMany(m.WorkOrderStep, { foreignKey: 'workOrderId', as: 'steps' });
  m.WorkOrder.hasMany(m.WorkOrderEvent, { foreignKey: 'workOrderId', as: 'events' });
  m.WorkOrder.hasMany(m.WorkOrderPart, { foreignKey: 'workOrderId', as: 'parts' });
  m.WorkOrder.hasMany(m.Attachment, { foreignKey: 'workOrderId', as: 'attachments' });
  m.WorkOrder.hasMany(m.Amendment, { foreignKey: 'workOrderId', as: 'amendments' });
  m.WorkOrder.hasMany(m.WorkOrderAlarm, { foreignKey: 'workOrderId', as: 'alarmLinks' });
  return m;
}

export { Amendment, Attachment, AuditEntry, ServiceEvent, WorkOrder, WorkOrderAlarm, WorkOrderEvent, WorkOrderPart, WorkOrderStep };
