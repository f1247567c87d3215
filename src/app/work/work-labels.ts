import { browserZone, formatInZone } from '../ui/time-format';
import { WorkPriority, WorkStatus } from './work-types';

export const STATUS_TEXT: Record<WorkStatus, string> = {
  requested: 'Requested',
  planned: 'Planned',
  'in-progress': 'In progress',
  'waiting-sign-off': 'Waiting for sign-off',
  closed: 'Closed',
  cancelled: 'Cancelled',
};

/** Shape as well as colour: each status has its own icon. */
export const STATUS_ICON: Record<WorkStatus, string> = {
  requested: 'inbox',
  planned: 'event',
  'in-progress': 'construction',
  'waiting-sign-off': 'rate_review',
  closed: 'task_alt',
  cancelled: 'block',
};

export const STATUSES: WorkStatus[] = ['requested', 'planned', 'in-progress', 'waiting-sign-off', 'closed', 'cancelled'];
export const OPEN_STATUSES: WorkStatus[] = ['requested', 'planned', 'in-progress', 'waiting-sign-off'];

export const PRIORITY_TEXT: Record<WorkPriority, string> = { low: 'Low', medium: 'Medium', high: 'High', urgent: 'Urgent' };

export const CONDITION_TEXT: Record<string, string> = {
  'engine-stopped': 'Engine stopped long enough',
  'coolant-temperature': 'Coolant cool enough',
  'coolant-pressure': 'No pressure in the system',
  'telemetry-fresh': 'Live data is fresh',
  'lockout-confirmed': 'Lockout/tagout confirmed',
  held: 'All of it held steady',
  'manual-pressure': 'Hand gauge reads no pressure',
  'manual-temperature': 'Hand thermometer reads cool enough',
  'manual-stopped': 'Stopped long enough (by hand)',
};

export const EVENT_TEXT: Record<string, string> = {
  created: 'Created',
  requested: 'Requested',
  accepted: 'Accepted',
  declined: 'Declined',
  assigned: 'Assigned',
  scheduled: 'Scheduled',
  changed: 'Changed',
  started: 'Started',
  completed: 'Completed',
  'signed-off': 'Signed off',
  'sent-back': 'Sent back',
  cancelled: 'Cancelled',
  'step-done': 'Step done',
  'step-done-manual-check': 'Step done on a MANUAL CHECK',
  'part-added': 'Part or fluid recorded',
  'attachment-added': 'File attached',
  amended: 'Amendment added',
  'baseline-reset': 'Conductivity baseline reset',
  'baseline-pending': 'Conductivity baseline not reset',
};

export const PART_TEXT: Record<string, string> = {
  'filter-charged': 'Charged filter',
  'filter-blank': 'Blank filter',
  additive: 'Additive (SCA)',
  coolant: 'Coolant',
  other: 'Other part',
};

export const STEP_UNIT_TEXT: Record<string, string> = { degC: '°C', kPa: 'kPa', L: 'L', turns: 'turns', '%': '%', 'units/gal': 'units/gal', pH: 'pH' };

/** A date in the app's one format (yyyy-mm-dd); a bare date stays the calendar date it names. */
export function formatDate(iso: string | null, zone?: string | null): string {
  if (!iso) return '—';
  if (/^\d{4}-\d{2}-\d{2}$/.test(iso)) return iso;
  return formatInZone(iso, zone ?? browserZone(), 'date');
}

/** A moment in the app's one format (yyyy-mm-dd hh:mm and the zone), in `zone` (default the browser's). */
export function formatDateTime(iso: string | number | null, zone?: string | null): string {
  if (iso === null) return '—';
  return formatInZone(iso, zone ?? browserZone(), 'datetime');
}

/** Monday of the ISO week of a YYYY-MM-DD date, as YYYY-MM-DD (local calendar). */
export function weekStart(date: string): string {
  const d = new Date(`${date}T00:00:00`);
  const day = (d.getDay() + 6) % 7;
  d.setDate(d.getDate() - day);
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}`;
}

export function todayIso(): string {
  const d = new Date();
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}`;
}

/** Kinds the alarms screens may link with under older names. */
export const KIND_ALIASES: Record<string, string> = {
  'coolant-filter-change': 'filter-change',
  filter: 'filter-change',
  flush: 'drain-flush-refill',
  test: 'coolant-test',
};
