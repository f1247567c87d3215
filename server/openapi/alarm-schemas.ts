/** Response bodies of the alarm feature's routes (alarms, on-call, rules, mail), as the handlers answer them. */
import { z } from 'zod';
import type { AlarmHistoryPage as AlarmHistoryPageType, AlarmView } from '../../shared/api/alarms-view';
import { ALARM_STATES, type AlarmState } from '../../shared/alarms/alarm-state';
import type { PerformanceReport } from '../../shared/alarms/performance';
import { CHANNEL_KEYS } from '../../shared/channels';
import { ROLES } from '../models/user';
import type { AlarmService } from '../services/alarms/alarm-service';
import type { listCaughtMail, listOutbox } from '../services/mail-admin';
import type { PersonView, ShiftCoverage, ShiftView } from '../services/alarms/oncall';
import { PRIORITIES } from '../services/alarms/priority';
import { RULE_KINDS, type RuleDefinition } from '../services/alarms/rule-definitions';
import type { EngineRulesView, PreviewResult } from '../services/alarms/rules-admin';
import { covers } from './api-doc';

const isoTime = z.string().openapi({ format: 'date-time' });
const isoOrNull = isoTime.nullable();
const id = z.number().int();
const idOrNull = id.nullable();
const strOrNull = z.string().nullable();
const nOrNull = z.number().nullable();
const state = z.enum(ALARM_STATES as [AlarmState, ...AlarmState[]]);
const count = z.number().int();

export const Alarm = z
  .object({
    id,
    engineId: id,
    engineName: strOrNull,
    siteId: idOrNull,
    siteName: strOrNull,
    rule: z.string(),
    title: z.string(),
    priority: z.enum(PRIORITIES),
    state,
    active: z.boolean(),
    raisedAt: isoTime,
    value: nOrNull,
    worstValue: nOrNull,
    unit: strOrNull.openapi({ description: 'degC, K, degC/min, kPa, kPa/min, uS/cm, rpm, or null' }),
    message: z.string(),
    acknowledgedAt: isoOrNull,
    acknowledgedBy: idOrNull,
    note: strOrNull,
    shelvedUntil: isoOrNull,
    shelveReason: strOrNull,
    clearedAt: isoOrNull,
    closedAt: isoOrNull,
    escalationLevel: count,
    lastNotifiedAt: isoOrNull,
    chatteringAt: isoOrNull.optional(),
  })
  .openapi('Alarm');
covers<AlarmView>()(Alarm);

const historyEntry = z.object({
  at: isoTime,
  event: z.string(),
  fromState: state.nullable(),
  toState: state.nullable(),
  userId: idOrNull,
  value: nOrNull,
  note: strOrNull,
});
export const AlarmHistoryPage = z.object({ total: count, limit: count, offset: count, entries: z.array(historyEntry) }).openapi('AlarmHistoryPage');
covers<AlarmHistoryPageType>()(AlarmHistoryPage);

export const AlarmDetail = Alarm.extend({
  meaning: strOrNull,
  firstStep: strOrNull,
  history: z.array(historyEntry).openapi({ description: 'one page (limit, offset) in time order' }),
  historyTotal: count,
}).openapi('AlarmDetail');
covers<Awaited<ReturnType<AlarmService['get']>>>()(AlarmDetail);

export const AlarmSummary = z.object({
  open: count,
  active: count,
  byState: z.record(z.string(), count),
  byPriority: z.record(z.string(), count),
  flood: z.object({ flooding: z.boolean(), since: isoOrNull, inLast10Min: count }),
});
covers<Awaited<ReturnType<AlarmService['summary']>>>()(AlarmSummary);

export const AlarmPerformance = z
  .object({
    from: z.number().openapi({ description: 'ms since epoch' }),
    to: z.number(),
    total: count,
    days: z.number(),
    perDay: z.number(),
    per10Min: z.number(),
    max10Min: count,
    share10MinOver10: z.number(),
    mostFrequent: z.array(z.object({ key: z.string(), count, share: z.number() })),
    chattering: z.array(z.object({ key: z.string(), bursts: count, maxInWindow: count })),
    chatter: z.object({ count, windowMs: z.number() }),
    standing: z.array(z.object({ key: z.string(), activatedAt: z.number(), activeMs: z.number() })),
    acknowledge: z.object({ count, meanMs: nOrNull, medianMs: nOrNull, unacknowledged: count }),
  })
  .openapi('AlarmPerformance');
covers<PerformanceReport>()(AlarmPerformance);

export const Shift = z
  .object({
    id,
    siteId: id,
    userId: id,
    userName: strOrNull,
    backupUserId: idOrNull,
    backupUserName: strOrNull,
    startsAt: isoTime,
    endsAt: isoTime,
  })
  .openapi('Shift');
covers<ShiftView>()(Shift);
const coverage = z.object({
  overlaps: z.array(z.object({ shiftId: idOrNull, userId: id, samePerson: z.boolean(), from: isoTime, to: isoTime })),
  uncovered: z.array(z.object({ from: isoTime, to: isoTime })),
});
covers<ShiftCoverage>()(coverage);
export const ShiftWithCoverage = Shift.extend({ coverage }).openapi('ShiftWithCoverage');

export const Person = z.object({ id, name: z.string(), email: z.string(), role: z.enum(ROLES) });
covers<PersonView>()(Person.extend({ role: z.string() }));

const params = z.record(z.string(), z.unknown()).openapi({ description: 'the rule kind’s parameters (numbers, short strings, booleans)' });
export const Rule = z
  .object({
    key: z.string(),
    kind: z.enum(RULE_KINDS),
    channel: z.enum(CHANNEL_KEYS as [string, ...string[]]),
    priority: z.enum(PRIORITIES),
    enabled: z.boolean(),
    title: z.string(),
    meaning: z.string(),
    firstStep: z.string(),
    params,
  })
  .openapi('Rule');
covers<RuleDefinition>()(Rule);
export const RuleProfile = z.object({ rules: z.array(Rule) });
export const EngineRules = z
  .object({
    engineId: id,
    rules: z.array(
      Rule.extend({ overridden: z.boolean(), override: z.object({ rule: z.string(), enabled: z.boolean(), params: params.nullable() }).nullable() }),
    ),
  })
  .openapi('EngineRules');
covers<EngineRulesView>()(EngineRules);
export const RulePreview = z.object({
  engineId: id,
  rule: z.string(),
  from: isoTime,
  to: isoTime,
  readings: count,
  alarms: z.array(z.object({ raisedAt: isoTime, clearedAt: isoOrNull, value: nOrNull, message: z.string() })),
});
covers<PreviewResult>()(RulePreview);

export const CaughtMail = z.object({ id, to: z.string(), from: strOrNull, subject: strOrNull, receivedAt: isoTime, text: strOrNull });
covers<Awaited<ReturnType<typeof listCaughtMail>>[number]>()(CaughtMail);
export const OutboxMessage = z.object({
  id,
  to: z.string(),
  subject: z.string(),
  alarmId: idOrNull,
  attempts: count,
  nextAttemptAt: isoTime,
  sentAt: isoOrNull,
  lastError: strOrNull,
  createdAt: isoTime,
});
covers<Awaited<ReturnType<typeof listOutbox>>[number]>()(OutboxMessage);
