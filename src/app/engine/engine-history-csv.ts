import { csvField } from '../work/work-csv';
import { PART_TEXT, STATUS_TEXT } from '../work/work-labels';
import { UnitPreferences, formatStored } from '../ui/unit-format';
import { CoolantTest } from '../coolant/coolant-types';
import { EngineHistory, HistoryManualCheck, HistoryPart } from './engine-history-types';

export type HistorySection = 'work-order' | 'coolant-test' | 'run-hours' | 'service-event';

/** One line of the service history, as on paper and in the CSV. Values already in the viewer's units. */
export interface HistoryRow {
  section: HistorySection;
  /** ISO 8601 UTC: the moment the row is sorted by. */
  date: string;
  reference: string;
  kind: string;
  title: string;
  status: string;
  doneBy: string;
  signedOffBy: string;
  partsAndFluids: string;
  readings: string;
  decision: string;
  /** Non-empty when a step went ahead on a manual check instead of live data. */
  manualCheck: string;
  note: string;
}

const HEADER = [
  'section',
  'date',
  'reference',
  'kind',
  'title',
  'status',
  'done_by',
  'signed_off_by',
  'parts_and_fluids',
  'readings',
  'decision',
  'manual_check',
  'note',
];

const ADDITIVE_STATUS: Record<string, string> = {
  low: 'additive low',
  'in-range': 'additive in range',
  high: 'additive high',
  'not-applicable': 'no strip decision',
};
const FILTER_TEXT: Record<string, string> = { charged: 'charged filter', blank: 'blank filter' };

export function partText(p: HistoryPart, prefs: UnitPreferences): string {
  const what = PART_TEXT[p.kind] ?? p.kind;
  const qty = p.unit === 'L' ? formatStored(p.quantity, 'volume', prefs, 2) : `${p.quantity} pcs`;
  return `${what} ${qty}${p.description ? ` (${p.description})` : ''}`;
}

export function manualCheckText(m: HistoryManualCheck, prefs: UnitPreferences): string {
  return (
    `MANUAL CHECK on "${m.stepTitle}": gauge ${formatStored(m.gaugeKpa, 'pressure', prefs)}, coolant ${formatStored(m.tempC, 'temperature', prefs)}, ` +
    `stopped ${m.minutesSinceStop} min, checked by ${m.checkedBy}: ${m.reason}`
  );
}

export function testReadings(t: CoolantTest, prefs: UnitPreferences): string {
  const out: string[] = [];
  if (t.scaUnitsPerGal !== null) out.push(`SCA ${t.scaUnitsPerGal} units/US gal`);
  if (t.glycolPercent !== null) out.push(`glycol ${t.glycolPercent} % by volume`);
  if (t.freezePointC !== null) out.push(`freeze point ${formatStored(t.freezePointC, 'temperature', prefs)}`);
  if (t.ph !== null) out.push(`pH ${t.ph}`);
  if (t.conductivityUsCm !== null) out.push(`conductivity ${formatStored(t.conductivityUsCm, 'conductivity', prefs)}`);
  if (t.appearance) out.push(t.appearance);
  return out.join('; ');
}

/** The decision stored with the test (computed by the server with decideAdditive), in words. */
export function testDecision(t: CoolantTest, prefs: UnitPreferences): string {
  const d = t.decision;
  if (!d) return '';
  const out: string[] = [];
  const a = d.additive;
  if (a) {
    out.push(ADDITIVE_STATUS[a.status] ?? a.status);
    if (a.filter) out.push(FILTER_TEXT[a.filter] ?? a.filter);
    if (a.liquidAdditiveL > 0) out.push(`add ${formatStored(a.liquidAdditiveL, 'volume', prefs, 2)} liquid additive`);
  }
  if (d.freeze && d.freeze.freezePointC !== null) out.push(`protected to ${formatStored(d.freeze.freezePointC, 'temperature', prefs)}`);
  out.push(...d.notes);
  return out.join('; ');
}

/** Every row of the history, section by section, each newest first (as the server sends them). */
export function historyRows(h: EngineHistory, prefs: UnitPreferences): HistoryRow[] {
  const rows: HistoryRow[] = [];
  const blank = {
    reference: '',
    kind: '',
    title: '',
    status: '',
    doneBy: '',
    signedOffBy: '',
    partsAndFluids: '',
    readings: '',
    decision: '',
    manualCheck: '',
    note: '',
  };
  for (const o of h.workOrders) {
    rows.push({
      ...blank,
      section: 'work-order',
      date: o.at,
      reference: `work order #${o.id}`,
      kind: o.kindTitle,
      title: o.title,
      status: STATUS_TEXT[o.status] ?? o.status,
      doneBy: (o.doneByNames.length ? o.doneByNames : o.assigneeName ? [o.assigneeName] : []).join(', '),
      signedOffBy: o.signedOffByName ? `${o.signedOffByName}${o.signedOffAt ? ` ${o.signedOffAt}` : ''}` : '',
      partsAndFluids: o.parts.map((p) => partText(p, prefs)).join('; '),
      manualCheck: o.manualCheckSteps.map((m) => manualCheckText(m, prefs)).join(' | '),
      note: o.resets.map((r) => r.note ?? (r.event === 'baseline-reset' ? 'conductivity baseline reset' : r.event)).join('; '),
    });
  }
  for (const t of h.coolantTests) {
    rows.push({
      ...blank,
      section: 'coolant-test',
      date: t.testedAt,
      reference: `coolant test #${t.id}`,
      kind: t.method,
      title: t.source === 'lab-import' ? 'Coolant test (lab import)' : 'Coolant test',
      status: t.decision?.additive ? (ADDITIVE_STATUS[t.decision.additive.status] ?? t.decision.additive.status) : '',
      doneBy: t.testedByName ?? '',
      readings: testReadings(t, prefs),
      decision: testDecision(t, prefs),
      note: t.notes ?? '',
    });
  }
  for (const r of h.runHoursAdjustments) {
    rows.push({
      ...blank,
      section: 'run-hours',
      date: r.at,
      reference: `correction #${r.id}`,
      kind: 'Run-hours correction',
      title: `${r.oldRunHours} h -> ${r.newRunHours} h`,
      doneBy: r.userName ?? '',
      note: r.reason,
    });
  }
  for (const e of h.serviceEvents) {
    rows.push({
      ...blank,
      section: 'service-event',
      date: e.doneAt,
      reference: e.workOrderId ? `work order #${e.workOrderId}` : `service event #${e.id}`,
      kind: e.taskKey,
      title: e.taskTitle,
      readings: e.runHours === null ? '' : `at ${Math.round(e.runHours * 10) / 10} h`,
      note: 'due count of this task restarted here',
    });
  }
  return rows;
}

/** RFC 4180, CRLF line ends, header first; fields neutralised against spreadsheet formulas (csvField). */
export function historyToCsv(rows: readonly HistoryRow[]): string {
  const out = [HEADER.join(',')];
  for (const r of rows) {
    out.push(
      [r.section, r.date, r.reference, r.kind, r.title, r.status, r.doneBy, r.signedOffBy, r.partsAndFluids, r.readings, r.decision, r.manualCheck, r.note]
        .map(csvField)
        .join(','),
    );
  }
  return out.join('\r\n') + '\r\n';
}
