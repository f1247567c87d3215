/**
 * Demo work, invented and fixed (no randomness): each technician has work assigned, one order of each is
 * under way, and the operator has raised a request the planner has still to accept, so every role's first
 * screens show real work. Dates count from the seed time, in the site's zone.
 */
import type { Transaction } from 'sequelize';
import type { Engine, Models } from '../server/models';
import type { WorkPriority, WorkStatus } from '../server/models/work-order';
import { workTemplate, type WorkKind } from '../server/services/work-templates';

const DAY = 86_400_000;
const MIN = 60_000;

export interface DemoWorkOrder {
  engine: string;
  kind: WorkKind;
  /** E-mail of the assignee; null: not yet assigned. */
  assignee: string | null;
  status: Extract<WorkStatus, 'requested' | 'planned' | 'in-progress'>;
  priority: WorkPriority;
  /** Due date in days from the seed day (negative: overdue); null: none. */
  dueInDays: number | null;
  /** In progress: started this many minutes before the seed, with the first `stepsDone` steps done. */
  startedMinAgo?: number;
  stepsDone?: number;
  /** A value typed on the next step and saved as a draft (not yet completed). */
  draft?: { value: number; unit: string };
  description?: string;
}

export const DEMO_WORK_ORDERS: DemoWorkOrder[] = [
  // the fire-pump engine is behind on its checks (overdue on the due list): the technician is on its weekly inspection
  {
    engine: 'Fire-pump engine',
    kind: 'weekly-inspection',
    assignee: 'tech@jacketwatch.test',
    status: 'in-progress',
    priority: 'high',
    dueInDays: 0,
    startedMinAgo: 25,
    stepsDone: 1,
    draft: { value: 41, unit: 'degC' },
  },
  { engine: 'Fire-pump engine', kind: 'filter-change', assignee: 'tech@jacketwatch.test', status: 'planned', priority: 'medium', dueInDays: 1 },
  { engine: 'Intake gen-set north', kind: 'coolant-test', assignee: 'tech@jacketwatch.test', status: 'planned', priority: 'low', dueInDays: 9 },
  // the booster engine is past its oil-drain hours
  { engine: 'Booster pump engine', kind: 'oil-drain', assignee: 'tech2@jacketwatch.test', status: 'planned', priority: 'high', dueInDays: -1 },
  {
    engine: 'Ridgeback gen-set 2',
    kind: 'monthly-exercise',
    assignee: 'tech2@jacketwatch.test',
    status: 'in-progress',
    priority: 'medium',
    dueInDays: 1,
    startedMinAgo: 50,
    stepsDone: 1,
  },
  // raised by the operator, waiting for the planner
  {
    engine: 'Ridgeback gen-set 1',
    kind: 'leak-check',
    assignee: null,
    status: 'requested',
    priority: 'medium',
    dueInDays: null,
    description: 'Drops of coolant under the lower radiator hose after the weekly run; the reservoir level looks normal.',
  },
];

/** YYYY-MM-DD of `ms` in `zone`. */
function dateIn(ms: number, zone: string): string {
  const p = Object.fromEntries(
    new Intl.DateTimeFormat('en-CA', { timeZone: zone, year: 'numeric', month: '2-digit', day: '2-digit' }).formatToParts(ms).map((x) => [x.type, x.value]),
  );
  return `${p.year}-${p.month}-${p.day}`;
}

/** Seed the demo work orders with their steps and history; returns how many were created. */
export async function seedWorkDemo(models: Models, engines: Engine[], opts: { transaction?: Transaction; now?: number } = {}): Promise<number> {
  const { transaction } = opts;
  const now = opts.now ?? Date.now();
  const users = await models.User.findAll({ transaction });
  const byEmail = new Map(users.map((u) => [u.email, u]));
  const planner = byEmail.get('planner@jacketwatch.test');
  const operator = byEmail.get('operator@jacketwatch.test');
  if (!planner || !operator) return 0;
  const sites = new Map((await models.Site.findAll({ transaction })).map((s) => [s.id, s]));
  let created = 0;
  for (const w of DEMO_WORK_ORDERS) {
    const engine = engines.find((e) => e.name === w.engine);
    const template = workTemplate(w.kind);
    if (!engine || !template) continue;
    const zone = sites.get(engine.siteId)?.timeZone ?? 'UTC';
    const assignee = w.assignee ? byEmail.get(w.assignee) : undefined;
    const requested = w.status === 'requested';
    const createdAt = new Date(now - (requested ? 90 * MIN : 2 * DAY));
    const startedAt = w.startedMinAgo !== undefined ? new Date(now - w.startedMinAgo * MIN) : null;
    const order = await models.WorkOrder.create(
      {
        engineId: engine.id,
        kind: w.kind,
        title: `${template.title}: ${engine.name}`,
        description: w.description ?? null,
        priority: w.priority,
        dueDate: w.dueInDays === null ? null : dateIn(now + w.dueInDays * DAY, zone),
        assigneeId: assignee?.id ?? null,
        status: w.status,
        createdBy: requested ? operator.id : planner.id,
        requestedBy: requested ? operator.id : null,
        startedAt,
      },
      { transaction },
    );
    const done = w.stepsDone ?? 0;
    await models.WorkOrderStep.bulkCreate(
      template.steps.map((s, i) => {
        const isDone = i < done && startedAt !== null;
        const draft = i === done && w.draft && s.input === 'value' ? w.draft : null;
        return {
          workOrderId: order.id,
          position: i + 1,
          key: s.key,
          title: s.title,
          detail: s.detail ?? null,
          input: s.input,
          unit: s.unit ?? null,
          optional: !!s.optional,
          gated: s.gated,
          caution: s.caution ?? null,
          resultValue: draft?.value ?? null,
          resultUnit: draft?.unit ?? null,
          lockoutConfirmed: isDone && s.key === 'stop-and-lock-out' ? true : null,
          doneAt: isDone ? new Date(startedAt!.getTime() + (i + 1) * 4 * MIN) : null,
          doneBy: isDone ? (assignee?.id ?? null) : null,
        };
      }),
      { transaction },
    );
    const event = (at: Date, userId: number, name: string, fromStatus: string | null, toStatus: string | null) =>
      models.WorkOrderEvent.create(
        {
          workOrderId: order.id,
          at,
          userId,
          event: name,
          fromStatus,
          toStatus,
          note: null,
          details: name === 'created' || name === 'requested' ? { kind: w.kind, alarmId: null } : null,
        },
        { transaction },
      );
    await event(createdAt, requested ? operator.id : planner.id, requested ? 'requested' : 'created', null, requested ? 'requested' : 'planned');
    if (startedAt && assignee) await event(startedAt, assignee.id, 'started', 'planned', 'in-progress');
    created++;
  }
  return created;
}
