import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import { ChannelKey } from '../../../shared/channels';
import { Person, Shift, ShiftInput } from './shift-dialog';

/** A rule of the profile as GET /api/rules and GET /api/rules/engines/:id send it (server/routes/rules.ts). */
export interface RuleDef {
  key: string;
  kind: string;
  channel: ChannelKey;
  priority: string;
  enabled: boolean;
  title: string;
  meaning: string;
  firstStep: string;
  params: Record<string, unknown>;
  overridden?: boolean;
  override?: RuleOverride | null;
}
/** One engine's override of a rule; params null: the profile's numbers. */
export interface RuleOverride {
  rule: string;
  enabled: boolean;
  params: Record<string, unknown> | null;
}
/** What an edited rule would have raised over an engine's last 7 days (POST /api/rules/preview). */
export interface RulePreview {
  readings: number;
  from: string;
  to: string;
  alarms: { raisedAt: string; clearedAt: string | null; value: number | null; message: string }[];
}
/** A message the local mail catcher received (GET /api/admin/mail). */
export interface CaughtMail {
  id: number;
  to: string;
  from: string;
  subject: string;
  receivedAt: string;
  text: string;
}
/** An alarm e-mail in the outbox: sent, waiting or failing (GET /api/admin/outbox). */
export interface OutboxItem {
  id: number;
  to: string;
  subject: string;
  alarmId: number | null;
  attempts: number;
  nextAttemptAt: string;
  sentAt: string | null;
  lastError: string | null;
  createdAt: string;
}

/** The alarm administration calls: the rule profile and overrides, the on-call rota, the mail catcher and outbox. */
@Injectable({ providedIn: 'root' })
export class AlarmsAdminService {
  private readonly http = inject(HttpClient);

  /** The default profile (engineId null) or one engine's rules with its overrides applied. */
  rules(engineId: number | null): Observable<{ rules: RuleDef[] }> {
    return this.http.get<{ rules: RuleDef[] }>(engineId === null ? '/api/rules' : `/api/rules/engines/${engineId}`);
  }

  saveProfile(rules: Omit<RuleDef, 'overridden' | 'override'>[]): Observable<unknown> {
    return this.http.put('/api/rules', { rules });
  }

  /** Replaces the engine's overrides; an empty list: the engine follows the default profile again. */
  saveOverrides(engineId: number, rules: RuleOverride[]): Observable<unknown> {
    return this.http.put(`/api/rules/engines/${engineId}`, { rules });
  }

  previewRule(engineId: number, rule: string, params: Record<string, number>): Observable<RulePreview> {
    return this.http.post<RulePreview>('/api/rules/preview', { engineId, rule, params });
  }

  /** Shifts from a time on (ms), optionally of one site and up to a time. */
  shifts(q: { from: number; to?: number; siteId?: number }): Observable<Shift[]> {
    const params: Record<string, string> = { from: String(q.from) };
    if (q.siteId !== undefined) params['siteId'] = String(q.siteId);
    if (q.to !== undefined) params['to'] = String(q.to);
    return this.http.get<Shift[]>('/api/oncall', { params });
  }

  createShift(input: ShiftInput): Observable<Shift> {
    return this.http.post<Shift>('/api/oncall', input);
  }

  updateShift(id: number, input: ShiftInput): Observable<Shift> {
    return this.http.patch<Shift>(`/api/oncall/${id}`, input);
  }

  deleteShift(id: number): Observable<unknown> {
    return this.http.delete(`/api/oncall/${id}`);
  }

  /** People with one of these roles (GET /api/people; planners and administrators). */
  people(roles: readonly string[]): Observable<Person[]> {
    return this.http.get<Person[]>('/api/people', { params: { role: roles.join(',') } });
  }

  caughtMail(): Observable<CaughtMail[]> {
    return this.http.get<CaughtMail[]>('/api/admin/mail');
  }

  outbox(): Observable<OutboxItem[]> {
    return this.http.get<OutboxItem[]>('/api/admin/outbox');
  }
}
