import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { Observable } from 'rxjs';
import type { AlarmState } from '../../../shared/alarms/alarm-state';
import { ListPage } from '../core/list-page';
import { Alarm, AlarmPriority } from './alarm-types';

export interface AlarmHistoryFilter {
  siteId: number | null;
  engineId: number | null;
  priority: AlarmPriority | null;
  state: AlarmState | null;
  offset: number;
  limit: number;
}

/** One page of the alarm history, filtered and paged on the server (GET /api/alarms?state=all&offset=...). */
@Injectable({ providedIn: 'root' })
export class AlarmHistoryApi {
  private readonly http = inject(HttpClient);

  page(f: AlarmHistoryFilter): Observable<ListPage<Alarm>> {
    const params: Record<string, string> = { state: 'all', offset: String(f.offset), limit: String(f.limit) };
    if (f.siteId !== null) params['siteId'] = String(f.siteId);
    if (f.engineId !== null) params['engineId'] = String(f.engineId);
    if (f.priority !== null) params['priority'] = f.priority;
    if (f.state !== null) params['alarmState'] = f.state;
    return this.http.get<ListPage<Alarm>>('/api/alarms', { params });
  }
}
