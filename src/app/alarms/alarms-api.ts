import { HttpClient, HttpErrorResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import { Alarm, AlarmDetail, AlarmListView, AlarmPerformance, AlarmSummary } from './alarm-types';

/** The alarm calls of the API (server/routes/alarms.ts). */
@Injectable({ providedIn: 'root' })
export class AlarmsApi {
  private readonly http = inject(HttpClient);

  list(state: AlarmListView | 'open', engineId?: number): Observable<Alarm[]> {
    const params: Record<string, string> = { state };
    if (engineId) params['engineId'] = String(engineId);
    return this.http.get<Alarm[]>('/api/alarms', { params });
  }

  get(id: number): Observable<AlarmDetail> {
    return this.http.get<AlarmDetail>(`/api/alarms/${id}`);
  }

  /** A further page of an alarm's history (time order). */
  history(id: number, offset: number, limit = 200): Observable<{ total: number; entries: AlarmDetail['history'] }> {
    return this.http.get<{ total: number; entries: AlarmDetail['history'] }>(`/api/alarms/${id}/history`, {
      params: { offset: String(offset), limit: String(limit) },
    });
  }

  summary(): Observable<AlarmSummary> {
    return this.http.get<AlarmSummary>('/api/alarms/summary');
  }

  performance(from: number, to: number): Observable<AlarmPerformance> {
    return this.http.get<AlarmPerformance>('/api/alarms/performance', { params: { from: String(from), to: String(to) } });
  }

  acknowledge(id: number, note?: string): Observable<Alarm> {
    return this.http.post<Alarm>(`/api/alarms/${id}/acknowledge`, note ? { note } : {});
  }

  shelve(id: number, minutes: number, reason: string): Observable<Alarm> {
    return this.http.post<Alarm>(`/api/alarms/${id}/shelve`, { minutes, reason });
  }

  unshelve(id: number): Observable<Alarm> {
    return this.http.post<Alarm>(`/api/alarms/${id}/unshelve`, {});
  }

  addNote(id: number, note: string): Observable<Alarm> {
    return this.http.post<Alarm>(`/api/alarms/${id}/notes`, { note });
  }
}

/** The server's own words for a refused call, or a plain fallback. */
export function errorText(err: unknown, fallback: string): string {
  if (err instanceof HttpErrorResponse) {
    if (err.status === 0) return 'The server cannot be reached. Try again in a moment.';
    const msg = (err.error as { error?: string } | null)?.error;
    if (typeof msg === 'string' && msg) return `${fallback}: ${msg}.`;
    if (err.status === 403) return `${fallback}: your role may not do this.`;
  }
  return `${fallback}.`;
}
