import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import {
  AdditiveProfile,
  AdditiveProfileInput,
  CoolantTest,
  RunHoursEntry,
  DueListPageResponse,
  DueListResponse,
  ImportResult,
  NewCoolantTest,
  NewTopUp,
  CoolantTopUp,
  TopUpsAnswer,
  ChemistryLimitsView,
} from './coolant-types';
import type { ChemistryLimits } from '../../../shared/coolant';

/** HTTP for the coolant screens; SI units both ways. */
@Injectable({ providedIn: 'root' })
export class CoolantService {
  private readonly http = inject(HttpClient);

  tests(engineId: number): Observable<CoolantTest[]> {
    return this.http.get<CoolantTest[]>(`/api/engines/${engineId}/coolant-tests`);
  }

  record(engineId: number, test: NewCoolantTest): Observable<CoolantTest> {
    return this.http.post<CoolantTest>(`/api/engines/${engineId}/coolant-tests`, test);
  }

  topUps(engineId: number): Observable<TopUpsAnswer> {
    return this.http.get<TopUpsAnswer>(`/api/engines/${engineId}/coolant-top-ups`);
  }

  recordTopUp(engineId: number, t: NewTopUp): Observable<CoolantTopUp> {
    return this.http.post<CoolantTopUp>(`/api/engines/${engineId}/coolant-top-ups`, t);
  }

  importLab(file: File, opts: { preview: boolean; engineId?: number }): Observable<ImportResult> {
    const form = new FormData();
    form.append('file', file, file.name);
    const params: Record<string, string> = { preview: opts.preview ? '1' : '0' };
    if (opts.engineId) params['engineId'] = String(opts.engineId);
    return this.http.post<ImportResult>('/api/coolant-tests/import', form, { params });
  }

  profile(): Observable<AdditiveProfile> {
    return this.http.get<AdditiveProfile>('/api/additive-profile');
  }

  saveProfile(p: AdditiveProfileInput): Observable<AdditiveProfile> {
    return this.http.put<AdditiveProfile>('/api/additive-profile', p);
  }

  chemistryLimits(): Observable<ChemistryLimitsView> {
    return this.http.get<ChemistryLimitsView>('/api/coolant-limits');
  }

  saveChemistryLimits(
    body: Partial<ChemistryLimits> & { extender: { everyHours: number | null; everyDays: number | null } | null },
  ): Observable<ChemistryLimitsView> {
    return this.http.put<ChemistryLimitsView>('/api/coolant-limits', body);
  }

  runHoursHistory(engineId: number): Observable<RunHoursEntry[]> {
    return this.http.get<RunHoursEntry[]>(`/api/engines/${engineId}/run-hours`);
  }

  correctRunHours(engineId: number, runHours: number, reason: string): Observable<{ runHours: number; oldRunHours: number }> {
    return this.http.post<{ runHours: number; oldRunHours: number }>(`/api/engines/${engineId}/run-hours`, { runHours, reason });
  }

  dueList(q: { siteId?: number; engineId?: number; windowDays: number }): Observable<DueListResponse> {
    const params: Record<string, string> = { windowDays: String(q.windowDays) };
    if (q.siteId) params['siteId'] = String(q.siteId);
    if (q.engineId) params['engineId'] = String(q.engineId);
    return this.http.get<DueListResponse>('/api/due-list', { params });
  }

  /** One page of the due list, computed and paged on the server. */
  dueListPage(q: { siteId?: number; windowDays: number; offset: number; limit: number }): Observable<DueListPageResponse> {
    const params: Record<string, string> = { windowDays: String(q.windowDays), offset: String(q.offset), limit: String(q.limit) };
    if (q.siteId) params['siteId'] = String(q.siteId);
    return this.http.get<DueListPageResponse>('/api/due-list', { params });
  }

  createWorkOrder(engineId: number, kind: string, title: string): Observable<{ id: number }> {
    return this.http.post<{ id: number }>('/api/work-orders', { engineId, kind, title });
  }
}
