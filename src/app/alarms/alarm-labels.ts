import { browserZone, formatInZone } from '../ui/time-format';
import { AlarmState } from '../../../shared/alarms/alarm-state';
import { UnitPreferences, displayValue, formatStored } from '../ui/unit-format';
import { AlarmPriority } from './alarm-types';

/**
 * How a priority looks: a word and a shape, so it never rests on colour alone.
 * Shapes are ours: the more sides, the more urgent (octagon, triangle, diamond, circle).
 */
export const PRIORITY_LOOK: Record<AlarmPriority, { text: string; icon: string; shape: string; rank: number }> = {
  urgent: { text: 'Urgent', icon: 'report', shape: 'octagon', rank: 3 },
  high: { text: 'High', icon: 'warning', shape: 'triangle', rank: 2 },
  medium: { text: 'Medium', icon: 'diamond', shape: 'diamond', rank: 1 },
  low: { text: 'Low', icon: 'info', shape: 'circle', rank: 0 },
};

export const PRIORITY_ORDER: AlarmPriority[] = ['urgent', 'high', 'medium', 'low'];

export function priorityLook(p: string) {
  return PRIORITY_LOOK[p as AlarmPriority] ?? { text: p, icon: 'help', shape: 'unknown', rank: -1 };
}

/** ISA-18.2 state names, written out. */
export const STATE_TEXT: Record<AlarmState, string> = {
  normal: 'Normal',
  unacknowledged: 'Unacknowledged',
  acknowledged: 'Acknowledged',
  'returned-unacknowledged': 'Returned to normal, unacknowledged',
  shelved: 'Shelved',
  'suppressed-by-design': 'Suppressed by design',
  'out-of-service': 'Out of service',
};

export function stateText(s: string): string {
  return STATE_TEXT[s as AlarmState] ?? s;
}

/** States that still wait for someone to acknowledge. */
export function needsAcknowledge(s: string): boolean {
  return s === 'unacknowledged' || s === 'returned-unacknowledged';
}

const EVENT_TEXT: Record<string, string> = {
  activate: 'Raised',
  clear: 'Returned to normal',
  value: 'New value',
  acknowledge: 'Acknowledged',
  shelve: 'Shelved',
  unshelve: 'Taken off the shelf',
  'shelf-expired': 'Shelf time ran out',
  suppress: 'Suppressed by design',
  unsuppress: 'No longer suppressed',
  'remove-from-service': 'Taken out of service',
  'return-to-service': 'Back in service',
  notified: 'E-mail sent',
  escalated: 'Escalated',
  note: 'Note',
};

export function eventText(e: string): string {
  return EVENT_TEXT[e] ?? e;
}

/**
 * An alarm's value in the user's units with its symbol. The server sends the stored unit beside
 * the value: degC, K (a difference), kPa, uS/cm, rpm, or a rate per minute of those.
 */
export function formatAlarmValue(value: number | null | undefined, unit: string | null | undefined, prefs: UnitPreferences): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  switch (unit) {
    case 'degC':
      return formatStored(value, 'temperature', prefs);
    case 'K':
      return formatStored(value, 'temperature-difference', prefs);
    case 'kPa':
      return formatStored(value, 'pressure', prefs);
    case 'uS/cm':
      return formatStored(value, 'conductivity', prefs);
    case 'rpm':
      return formatStored(value, 'speed', prefs);
    case 'degC/min': {
      const d = displayValue(value, 'temperature-difference', prefs, 2);
      return `${d.text} ${d.symbol}/min`;
    }
    case 'kPa/min': {
      const d = displayValue(value, 'pressure', prefs, prefs.pressure === 'kPa' ? 1 : 3);
      return `${d.text} ${d.symbol}/min`;
    }
    default:
      return unit ? `${value} ${unit}` : String(value);
  }
}

/** "4 min", "2 h 5 min", "3 d 4 h": how long ago, coarse enough to read at a glance. */
export function formatDuration(ms: number): string {
  if (!Number.isFinite(ms) || ms < 0) return '—';
  const s = Math.floor(ms / 1000);
  if (s < 60) return `${s} s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m} min`;
  const h = Math.floor(m / 60);
  if (h < 24) return m % 60 ? `${h} h ${m % 60} min` : `${h} h`;
  const d = Math.floor(h / 24);
  return h % 24 ? `${d} d ${h % 24} h` : `${d} d`;
}

/** A moment with seconds in the app's one format, in `zone` (the site's; the browser's when not known). */
export function formatTime(at: string | number | null | undefined, zone?: string | null): string {
  return formatInZone(at, zone ?? browserZone(), 'datetime-s');
}
