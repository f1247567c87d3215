import { Op, type WhereOptions } from 'sequelize';
import type { AppContext } from '../../app-context';
import { badRequest, conflict, HttpError, notFound } from '../../http-error';
import type { WorkOrder, WorkPriority, WorkStatus } from '../../models/work-order';
import type { AuthUser } from '../../telemetry/types';
import { formatValue } from '../alarms/value-format';
import { DEFAULT_RULES } from '../alarms/rule-definitions';
import { coolantTestView } from '../coolant/coolant-tests';
import { servicePlan } from '../coolant/service-plan';
import { workTemplate, type WorkKind } from '../work-templates';
import { pushWorkOrder } from './notify';
import type { ReadingHistory } from './reading-history';
import { EDITABLE, FINISHED, findTransition, STATUS_TEXT } from './transitions';
import { namesFor, summaryView, type WorkOrderSummary } from './views';
import { containsText, engineIdsMatching, type Page, type PageRequest } from '../list-page';

export interface CreateInput {
  engineId: number;
  kind: WorkKind;
  alarmId?: number;
  title?: string;
  description?: string;
  priority?: WorkPriority;
  dueDate?: string | null;
  assigneeId?: number | null;
  /** The service-plan task this order is for (from the due list); completing the order records the task done. */
  serviceTaskKey?: string;
}

export interface PlanInput {
  title?: string;
  description?: string | null;
  priority?: WorkPriority;
  dueDate?: string | null;
  assigneeId?: number | null;
}

export interface ListQuery {
  status?: WorkStatus[];
  engineId?: number;
  /** The caller's visible engines: the list never goes beyond them. */
  engineIds?: number[];
  assigneeId?: number;
  siteId?: number;
  mine?: boolean;
  /** Text in the order's title, its engine's name or its site's name (case-insensitive). */
  q?: string;
}

/** A rule's title in words (no raw keys in a description for people). */
function ruleTitle(rule: string): string {
  return DEFAULT_RULES.find((r) => r.key === rule)?.title ?? rule.replace(/_/g, ' ');
}

/** A time as the site reads it, with its zone: "25 Nov 2026, 15:28 (Europe/Berlin)". */
function siteTime(d: Date, timeZone: string): string {
  const f = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  });
  return `${f.format(d)} (${timeZone})`;
}

const PLANNERS = ['planner', 'admin'] as const;
export const isPlanner = (u: AuthUser) => (PLANNERS as readonly string[]).includes(u.role);

/** The work-order job: creation from a template (and from an alarm), the status flow, planning, lists and records. */
export class WorkOrderService {
  constructor(
    readonly ctx: AppContext,
    readonly history: ReadingHistory,
  ) {}

  get models() {
    return this.ctx.models;
  }

  async event(
    orderId: number,
    userId: number | null,
    event: string,
    more: { fromStatus?: string | null; toStatus?: string | null; note?: string | null; details?: Record<string, unknown> | null } = {},
    transaction?: import('sequelize').Transaction,
  ) {
    return this.models.WorkOrderEvent.create(
      {
        workOrderId: orderId,
        at: new Date(),
        userId,
        event,
        fromStatus: more.fromStatus ?? null,
        toStatus: more.toStatus ?? null,
        note: more.note ?? null,
        details: more.details ?? null,
      },
      { transaction },
    );
  }

  async audit(
    userId: number | null,
    action: string,
    entity: string,
    entityId: number | null,
    details: Record<string, unknown> | null,
    transaction?: import('sequelize').Transaction,
  ) {
    return this.models.AuditEntry.create({ at: new Date(), userId, action, entity, entityId, details }, { transaction });
  }

  async getOrder(id: number): Promise<WorkOrder> {
    const o = await this.models.WorkOrder.findByPk(id);
    if (!o) throw notFound('work order');
    return o;
  }

  private async checkAssignee(assigneeId: number | null | undefined): Promise<void> {
    if (assigneeId === null || assigneeId === undefined) return;
    const u = await this.models.User.findByPk(assigneeId, { attributes: ['id', 'role', 'disabled'] });
    if (!u || u.disabled || u.role !== 'technician') throw badRequest('assignee must be an active technician', 'assigneeId');
  }

  async create(user: AuthUser, input: CreateInput): Promise<WorkOrder> {
    const template = workTemplate(input.kind);
    if (!template) throw badRequest('unknown kind', 'kind');
    const engine = await this.models.Engine.findByPk(input.engineId);
    if (!engine || engine.retiredAt) throw badRequest('engine does not exist or is retired', 'engineId');
    const planner = isPlanner(user);
    // operators (and technicians who find something) raise a request; planning fields are the planner's
    if (!planner && (input.assigneeId || input.dueDate)) throw new HttpError(403, 'only a planner assigns and schedules; raise the request without them');
    await this.checkAssignee(input.assigneeId);
    if (input.serviceTaskKey !== undefined) {
      const task = (await servicePlan(this.models, engine)).find((t) => t.key === input.serviceTaskKey);
      if (!task) throw badRequest("serviceTaskKey: not a task of this engine's service plan", 'serviceTaskKey');
      if (task.workKind !== input.kind) throw badRequest(`kind: the task "${task.title}" is done as a ${task.workKind} work order`, 'kind');
    }

    let description = input.description?.trim() || null;
    let priority: WorkPriority = input.priority ?? 'medium';
    let title = input.title?.trim() || `${template.title}: ${engine.name}`;
    if (input.alarmId !== undefined) {
      const alarm = await this.models.Alarm.findByPk(input.alarmId);
      if (!alarm) throw badRequest('alarm not found', 'alarmId');
      if (alarm.engineId !== engine.id) throw badRequest('alarm belongs to another engine', 'alarmId');
      const value = alarm.value === null ? '' : ` Value when raised: ${formatValue(alarm.value, alarm.unit)}.`;
      const worst = alarm.worstValue === null ? '' : ` Worst since: ${formatValue(alarm.worstValue, alarm.unit)}.`;
      const site = await this.models.Site.findByPk(engine.siteId, { attributes: ['timeZone'] });
      const fromAlarm = `From alarm #${alarm.id}: ${ruleTitle(alarm.rule)}, ${alarm.priority} priority, raised ${siteTime(new Date(alarm.raisedAt), site?.timeZone ?? 'UTC')}. ${alarm.message.replace(/\.?$/, '.')}${value}${worst}`;
      description = description ? `${fromAlarm}\n\n${description}` : fromAlarm;
      if (!input.priority) priority = alarm.priority as WorkPriority;
      if (!input.title) title = `${template.title}: ${engine.name} (alarm #${alarm.id})`;
    }

    const status: WorkStatus = planner ? 'planned' : 'requested';
    const order = await this.ctx.sequelize.transaction(async (transaction) => {
      const o = await this.models.WorkOrder.create(
        {
          engineId: engine.id,
          kind: input.kind,
          title: title.slice(0, 200),
          description,
          priority,
          dueDate: input.dueDate ?? null,
          assigneeId: input.assigneeId ?? null,
          status,
          createdBy: user.id,
          requestedBy: planner ? null : user.id,
          serviceTaskKey: input.serviceTaskKey ?? null,
        },
        { transaction },
      );
      await this.models.WorkOrderStep.bulkCreate(
        template.steps.map((s, i) => ({
          workOrderId: o.id,
          position: i + 1,
          key: s.key,
          title: s.title,
          detail: s.detail ?? null,
          input: s.input,
          unit: s.unit ?? null,
          optional: !!s.optional,
          gated: s.gated,
          caution: s.caution ?? null,
        })),
        { transaction },
      );
      if (input.alarmId !== undefined) await this.models.WorkOrderAlarm.create({ workOrderId: o.id, alarmId: input.alarmId }, { transaction });
      await this.event(
        o.id,
        user.id,
        planner ? 'created' : 'requested',
        { toStatus: status, details: { kind: input.kind, alarmId: input.alarmId ?? null } },
        transaction,
      );
      return o;
    });
    pushWorkOrder(this.ctx, order, 'created');
    return order;
  }

  async plan(user: AuthUser, id: number, input: PlanInput): Promise<WorkOrder> {
    const order = await this.getOrder(id);
    if (!EDITABLE.includes(order.status)) throw conflict(`a work order that is ${STATUS_TEXT[order.status]} is not changed; append an amendment`);
    await this.checkAssignee(input.assigneeId);
    const changes: Record<string, { from: unknown; to: unknown }> = {};
    for (const [k, v] of Object.entries(input) as [keyof PlanInput, unknown][]) {
      if (v !== undefined && (order as unknown as Record<string, unknown>)[k] !== v)
        changes[k] = { from: (order as unknown as Record<string, unknown>)[k], to: v };
    }
    if (!Object.keys(changes).length) return order;
    await this.ctx.sequelize.transaction(async (transaction) => {
      await order.update(Object.fromEntries(Object.entries(changes).map(([k, c]) => [k, c.to])), { transaction });
      const event = 'assigneeId' in changes ? 'assigned' : 'dueDate' in changes ? 'scheduled' : 'changed';
      await this.event(order.id, user.id, event, { details: changes }, transaction);
    });
    pushWorkOrder(this.ctx, order, 'planned');
    return order;
  }

  async transition(user: AuthUser, id: number, to: WorkStatus, note?: string): Promise<WorkOrder> {
    const order = await this.getOrder(id);
    const t = findTransition(order.status, to);
    if (!t) throw conflict(`a work order that is ${STATUS_TEXT[order.status]} cannot become ${STATUS_TEXT[to]}`, 'to');
    if (!t.roles.includes(user.role))
      throw new HttpError(403, `only ${t.roles.join(' or ')} may move a work order from ${STATUS_TEXT[t.from]} to ${STATUS_TEXT[t.to]}`);
    if (t.needsNote && !note?.trim()) throw badRequest('say why in a note', 'note');
    const now = new Date();
    const patch: Partial<Record<string, unknown>> = { status: to };
    if (t.event === 'started') {
      if (order.assigneeId && order.assigneeId !== user.id) throw new HttpError(403, 'this work order is assigned to another technician');
      if (!order.assigneeId) patch.assigneeId = user.id;
      patch.startedAt = order.startedAt ?? now;
    }
    if (t.event === 'completed') {
      if (order.assigneeId !== user.id) throw new HttpError(403, 'only the assigned technician completes the work');
      const open = await this.models.WorkOrderStep.count({ where: { workOrderId: id, optional: false, doneAt: null } });
      if (open) throw conflict(`${open} required step${open === 1 ? ' is' : 's are'} not done yet`);
      patch.completedAt = now;
    }
    if (t.event === 'signed-off') {
      patch.signedOffBy = user.id;
      patch.signedOffAt = now;
      patch.closedAt = now;
    }
    if (to === 'cancelled') patch.closedAt = now;
    if (t.event === 'sent-back') patch.completedAt = null;

    await this.ctx.sequelize.transaction(async (transaction) => {
      await order.update(patch, { transaction });
      await this.event(order.id, user.id, t.event, { fromStatus: t.from, toStatus: t.to, note: note?.trim() || null }, transaction);
      if (t.event === 'signed-off' || to === 'cancelled') {
        await this.audit(
          user.id,
          t.event === 'signed-off' ? 'work-order-signed-off' : 'work-order-cancelled',
          'work_order',
          order.id,
          { from: t.from, note: note ?? null },
          transaction,
        );
      }
      if (t.event === 'completed') await this.afterCompletion(order, user, transaction);
    });
    pushWorkOrder(this.ctx, order, t.event);
    return order;
  }

  /**
   * Fresh coolant or a new filter resets what depends on it: a service event for the service plan and,
   * after a filter change or drain-flush-refill, a new conductivity baseline from the first readings after the refill.
   */
  private async afterCompletion(order: WorkOrder, user: AuthUser, transaction: import('sequelize').Transaction): Promise<void> {
    const template = workTemplate(order.kind);
    if (!template) return;
    const engine = await this.models.Engine.findByPk(order.engineId, { transaction });
    const now = new Date();
    // the task the order was created for (a plan task with no template of its own is done as a general repair), else the kind's own
    const taskKey = order.serviceTaskKey ?? template.serviceTask;
    if (taskKey) {
      await this.models.ServiceEvent.create(
        { engineId: order.engineId, taskKey, doneAt: now, runHours: engine?.runHours ?? null, workOrderId: order.id },
        { transaction },
      );
    }
    if (!template.resetsConductivityBaseline) return;
    const refill = await this.models.WorkOrderStep.findOne({ where: { workOrderId: order.id, key: 'refill' }, transaction });
    const from = refill?.doneAt ? new Date(refill.doneAt).getTime() : order.startedAt ? new Date(order.startedAt).getTime() : now.getTime();
    const series = await this.history.series(order.engineId);
    const after = series.coolant_conductivity.filter((r) => r.ts >= from && (r.quality ?? 0) === 0).map((r) => r.value);
    if (!after.length) {
      await this.event(
        order.id,
        user.id,
        'baseline-pending',
        { note: 'No good conductivity reading since the refill: the conductivity baseline was not reset. Run the engine and complete a coolant test.' },
        transaction,
      );
      return;
    }
    const recent = after.slice(-5).sort((a, b) => a - b);
    const median = recent.length % 2 ? recent[(recent.length - 1) / 2] : (recent[recent.length / 2 - 1] + recent[recent.length / 2]) / 2;
    await this.models.EngineBaseline.create(
      { engineId: order.engineId, channel: 'coolant_conductivity', baselineFrom: new Date(from), value: median },
      { transaction },
    );
    await this.event(
      order.id,
      user.id,
      'baseline-reset',
      { details: { channel: 'coolant_conductivity', baselineFrom: new Date(from).toISOString(), value: median, unit: 'uS/cm', samples: recent.length } },
      transaction,
    );
  }

  /** Technicians who may be assigned, by name; `ids` limits them to the asker's sites (null: all). */
  async assignees(ids: number[] | null) {
    const users = await this.models.User.findAll({
      where: { role: 'technician', disabled: false, ...(ids ? { id: ids } : {}) },
      attributes: ['id', 'name', 'email'],
      order: [['name', 'ASC']],
    });
    return users.map((u) => ({ id: u.id, name: u.name, email: u.email }));
  }

  /** The filters as one WHERE (the caller's visible engines always applied). */
  private async listWhere(user: AuthUser, q: ListQuery): Promise<WhereOptions> {
    const where: WhereOptions = {};
    const w = where as Record<string | symbol, unknown>;
    const and: WhereOptions[] = [];
    if (q.status?.length) w.status = q.status;
    if (q.engineId) w.engineId = q.engineId;
    if (q.assigneeId) w.assigneeId = q.assigneeId;
    if (q.mine) {
      if (user.role === 'technician') w.assigneeId = user.id;
      else and.push({ [Op.or]: [{ assigneeId: user.id }, { requestedBy: user.id }, { createdBy: user.id }] });
    }
    if (q.siteId) {
      const engines = await this.models.Engine.findAll({ where: { siteId: q.siteId }, attributes: ['id'], raw: true });
      w.engineId = q.engineId ? (engines.some((e) => e.id === q.engineId) ? q.engineId : -1) : engines.map((e) => e.id);
    }
    if (q.engineIds) {
      const allowed = new Set(q.engineIds);
      const cur = w.engineId as number | number[] | undefined;
      w.engineId = cur === undefined ? q.engineIds : (Array.isArray(cur) ? cur : [cur]).filter((id) => allowed.has(id));
    }
    if (q.q) {
      const engines = await engineIdsMatching(this.models, this.ctx.sequelize, q.q);
      and.push({ [Op.or]: [containsText(this.ctx.sequelize, 'title', q.q), ...(engines.length ? [{ engineId: engines }] : [])] });
    }
    if (and.length) w[Op.and] = and;
    return where;
  }

  /** Earliest due first, undated last, then by number: a total order, so pages never repeat or skip an order. */
  private static readonly ORDER: [string, string][] = [
    ['dueDate', 'ASC NULLS LAST'],
    ['id', 'ASC'],
  ];

  async list(user: AuthUser, q: ListQuery): Promise<WorkOrderSummary[]> {
    const orders = await this.models.WorkOrder.findAll({ where: await this.listWhere(user, q), order: WorkOrderService.ORDER, limit: 2000 });
    return this.summaries(orders);
  }

  /** One page of the list, with the number of orders matching over all pages. */
  async listPage(user: AuthUser, q: ListQuery, page: PageRequest): Promise<Page<WorkOrderSummary>> {
    const where = await this.listWhere(user, q);
    const [total, orders] = await Promise.all([
      this.models.WorkOrder.count({ where }),
      this.models.WorkOrder.findAll({ where, order: WorkOrderService.ORDER, limit: page.limit, offset: page.offset }),
    ]);
    return { items: await this.summaries(orders), total, limit: page.limit, offset: page.offset };
  }

  async summaries(orders: WorkOrder[]): Promise<WorkOrderSummary[]> {
    if (!orders.length) return [];
    const ids = orders.map((o) => o.id);
    const [names, steps, links] = await Promise.all([
      namesFor(this.models, orders),
      this.models.WorkOrderStep.findAll({ where: { workOrderId: ids }, attributes: ['workOrderId', 'doneAt', 'manualCheck'] }),
      this.models.WorkOrderAlarm.findAll({ where: { workOrderId: ids } }),
    ]);
    const agg = new Map<number, { alarmIds: number[]; stepsDone: number; stepsTotal: number; manualChecks: number }>();
    for (const id of ids) agg.set(id, { alarmIds: [], stepsDone: 0, stepsTotal: 0, manualChecks: 0 });
    for (const s of steps) {
      const a = agg.get(s.workOrderId)!;
      a.stepsTotal++;
      if (s.doneAt) a.stepsDone++;
      if (s.manualCheck) a.manualChecks++;
    }
    for (const l of links) agg.get(l.workOrderId)!.alarmIds.push(l.alarmId);
    return orders.map((o) => summaryView(o, names, agg.get(o.id)!));
  }

  /** The whole record: steps, parts, attachments, history and amendments, with people's names. */
  async detail(id: number) {
    const order = await this.getOrder(id);
    const [[summary], steps, parts, attachments, events, amendments] = await Promise.all([
      this.summaries([order]),
      this.models.WorkOrderStep.findAll({ where: { workOrderId: id }, order: [['position', 'ASC']] }),
      this.models.WorkOrderPart.findAll({ where: { workOrderId: id }, order: [['id', 'ASC']] }),
      this.models.Attachment.findAll({ where: { workOrderId: id }, order: [['id', 'ASC']] }),
      this.models.WorkOrderEvent.findAll({
        where: { workOrderId: id },
        order: [
          ['at', 'ASC'],
          ['id', 'ASC'],
        ],
      }),
      this.models.Amendment.findAll({ where: { workOrderId: id }, order: [['id', 'ASC']] }),
    ]);
    const userIds = new Set<number>();
    for (const s of steps) if (s.doneBy) userIds.add(s.doneBy);
    for (const p of parts) userIds.add(p.addedBy);
    for (const a of attachments) userIds.add(a.uploadedBy);
    for (const e of events) if (e.userId) userIds.add(e.userId);
    for (const a of amendments) userIds.add(a.authorId);
    const users = userIds.size ? await this.models.User.findAll({ where: { id: [...userIds] }, attributes: ['id', 'name'] }) : [];
    const name = (uid: number | null) => (uid ? (users.find((u) => u.id === uid)?.name ?? null) : null);
    const template = workTemplate(order.kind);
    const coolantTest = order.coolantTestId ? await coolantTestView(this.models, order.coolantTestId) : null;
    return {
      ...summary,
      coolantTestId: order.coolantTestId ?? null,
      serviceTaskKey: order.serviceTaskKey ?? null,
      coolantTest,
      cautions: template?.cautions ?? [],
      steps: steps.map((s) => ({
        id: s.id,
        position: s.position,
        key: s.key,
        title: s.title,
        detail: s.detail,
        input: s.input,
        unit: s.unit,
        optional: s.optional,
        gated: s.gated,
        caution: s.caution,
        after: template?.steps.find((t) => t.key === s.key)?.after ?? [],
        resultValue: s.resultValue,
        resultUnit: s.resultUnit,
        resultText: s.resultText,
        lockoutConfirmed: s.lockoutConfirmed,
        gateSnapshot: s.gateSnapshot ?? null,
        manualCheck: s.manualCheck ?? null,
        doneAt: s.doneAt ? new Date(s.doneAt).toISOString() : null,
        doneBy: s.doneBy,
        doneByName: name(s.doneBy ?? null),
      })),
      parts: parts.map((p) => ({
        id: p.id,
        kind: p.kind,
        description: p.description,
        quantity: p.quantity,
        unit: p.unit,
        addedBy: p.addedBy,
        addedByName: name(p.addedBy),
        createdAt: new Date(p.createdAt).toISOString(),
      })),
      attachments: attachments.map((a) => ({
        id: a.id,
        stepId: a.stepId,
        originalName: a.originalName,
        contentType: a.contentType,
        size: a.size,
        uploadedBy: a.uploadedBy,
        uploadedByName: name(a.uploadedBy),
        createdAt: new Date(a.createdAt).toISOString(),
        url: `/api/attachments/${a.id}`,
      })),
      history: events.map((e) => ({
        id: e.id,
        at: new Date(e.at).toISOString(),
        userId: e.userId,
        userName: name(e.userId),
        event: e.event,
        fromStatus: e.fromStatus,
        toStatus: e.toStatus,
        note: e.note,
        details: e.details ?? null,
      })),
      amendments: amendments.map((a) => ({
        id: a.id,
        text: a.text,
        authorId: a.authorId,
        authorName: name(a.authorId),
        createdAt: new Date(a.createdAt).toISOString(),
      })),
    };
  }

  assertEditable(order: WorkOrder): void {
    if (!EDITABLE.includes(order.status)) {
      throw conflict(
        FINISHED.includes(order.status)
          ? `a ${STATUS_TEXT[order.status]} work order is never edited; append an amendment`
          : `a work order that is ${STATUS_TEXT[order.status]} is not changed`,
      );
    }
  }
}
