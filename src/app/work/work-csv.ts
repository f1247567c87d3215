import { STATUS_TEXT } from './work-labels';
import { WorkOrderSummary } from './work-types';

const HEADER = [
  'id',
  'status',
  'priority',
  'due_date',
  'site',
  'engine',
  'kind',
  'title',
  'assignee',
  'steps_done',
  'steps_total',
  'manual_checks',
  'alarm_ids',
  'created_at',
  'closed_at',
];

/** RFC 4180 field: quoted when it holds a comma, quote or line break; quotes doubled. Leading = + - @ neutralised for spreadsheets. */
export function csvField(v: unknown): string {
  let s = v === null || v === undefined ? '' : String(v);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function workOrdersToCsv(orders: readonly WorkOrderSummary[]): string {
  const rows = [HEADER.join(',')];
  for (const o of orders) {
    rows.push(
      [
        o.id,
        STATUS_TEXT[o.status],
        o.priority,
        o.dueDate ?? '',
        o.siteName ?? '',
        o.engineName ?? '',
        o.kindTitle,
        o.title,
        o.assigneeName ?? '',
        o.stepsDone,
        o.stepsTotal,
        o.manualChecks,
        o.alarmIds.join(' '),
        o.createdAt,
        o.closedAt ?? '',
      ]
        .map(csvField)
        .join(','),
    );
  }
  return rows.join('\r\n') + '\r\n';
}
