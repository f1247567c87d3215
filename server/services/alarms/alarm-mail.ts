/** The e-mail for an alarm: what, where, the value with units, what the rule means, the first safe step, the link. */
import { formatInZone } from '../../../shared/time/zoned-time';
import type { Alarm } from '../../models/alarm';
import type { EngineEntry } from './engine-directory';
import type { RuleDefinition } from './rule-definitions';
import { formatValue } from './value-format';

export interface AlarmMail {
  subject: string;
  text: string;
  html: string;
}

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export const GENERAL_CAUTION =
  "A hot cooling system is under pressure: never open a cap or drain while it is hot. Jacketwatch supports, and never replaces, the engine maker's instructions, local codes and licensed practice.";

export function alarmMail(opts: {
  alarm: Alarm;
  def: Pick<RuleDefinition, 'title' | 'meaning' | 'firstStep'>;
  /** `timeZone`: the site's zone, in which every time of the e-mail is written (UTC when not known). */
  engine: Pick<EngineEntry, 'name' | 'siteName'> & { timeZone?: string | null };
  publicUrl: string;
  /** Why this person gets it: 'on call', 'backup', 'planner'. */
  reason: string;
  escalated: boolean;
  /** The alarm came from readings that arrived late and was still active once they had caught up. */
  late?: { measuredAt: number; arrivedAt: number };
}): AlarmMail {
  const { alarm, def, engine } = opts;
  const link = `${opts.publicUrl}/alarms/${alarm.id}`;
  const value = formatValue(alarm.value, alarm.unit);
  const worst = alarm.worstValue !== null && alarm.worstValue !== alarm.value ? formatValue(alarm.worstValue, alarm.unit) : null;
  // the app's one format in the site's zone: "2026-12-02 14:05 MST"
  const when = (t: number | Date) => formatInZone(t, engine.timeZone || 'UTC', 'datetime');
  const raised = when(alarm.raisedAt);
  const prefix = opts.escalated ? 'Not yet acknowledged: ' : '';
  const lateText = opts.late
    ? `The data came late: the readings behind this alarm were measured at ${when(opts.late.measuredAt)} and arrived at ${when(opts.late.arrivedAt)} (sent from the gateway's store after an outage). The condition was still active when the data caught up.`
    : null;
  const subject = `${prefix}${alarm.priority.toUpperCase()} alarm: ${def.title} on ${engine.name} (${engine.siteName})${opts.late ? ' (from late data)' : ''}`;
  const lines = [
    `${prefix}${def.title}`,
    '',
    `Engine:   ${engine.name}`,
    `Site:     ${engine.siteName}`,
    `Priority: ${alarm.priority}`,
    `Raised:   ${raised}`,
    `Value:    ${value}`,
    ...(worst ? [`Worst:    ${worst}`] : []),
    `Detail:   ${alarm.message}`,
    '',
    ...(lateText ? [lateText, ''] : []),
    `What it means: ${def.meaning}`,
    '',
    `First safe step: ${def.firstStep}`,
    '',
    `Acknowledge or shelve it here: ${link}`,
    '',
    `You get this e-mail as the ${opts.reason} for ${engine.siteName}.`,
    GENERAL_CAUTION,
  ];
  const html = [
    `<h2>${esc(prefix + def.title)}</h2>`,
    '<table>',
    ...[
      ['Engine', engine.name],
      ['Site', engine.siteName],
      ['Priority', alarm.priority],
      ['Raised', raised],
      ['Value', value],
      ...(worst ? [['Worst', worst]] : []),
      ['Detail', alarm.message],
    ].map(([k, v]) => `<tr><th align="left">${esc(k)}</th><td>${esc(v)}</td></tr>`),
    '</table>',
    ...(lateText ? [`<p><strong>${esc(lateText)}</strong></p>`] : []),
    `<p><strong>What it means:</strong> ${esc(def.meaning)}</p>`,
    `<p><strong>First safe step:</strong> ${esc(def.firstStep)}</p>`,
    `<p><a href="${esc(link)}">Open the alarm to acknowledge or shelve it</a></p>`,
    `<p><small>You get this e-mail as the ${esc(opts.reason)} for ${esc(engine.siteName)}. ${esc(GENERAL_CAUTION)}</small></p>`,
  ].join('\n');
  return { subject, text: lines.join('\n'), html };
}
