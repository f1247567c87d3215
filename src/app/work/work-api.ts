import { HttpClient, HttpErrorResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, catchError, map, shareReplay, throwError } from 'rxjs';
import type { EngineView } from '../../../shared/api/engine-view';
import { isNoAnswer } from '../core/network-status';
import { ReadingBucket } from './cooldown-series';
import {
  Assignee,
  CoolantTestSummary,
  ManualCheck,
  OpeningCheck,
  OrderCoolantTest,
  WorkOrderDetail,
  WorkOrderSummary,
  WorkPriority,
  WorkStatus,
  WorkTemplate,
} from './work-types';

/** What the coolant check of a work order needs to know of its engine. */
export type EngineFacts = Pick<EngineView, 'id' | 'name' | 'capacityL' | 'coolantFamily'>;

export interface ListFilter {
  status?: WorkStatus[];
  engineId?: number;
  siteId?: number;
  assigneeId?: number;
  mine?: boolean;
}

export interface CreateRequest {
  engineId: number;
  kind: string;
  alarmId?: number;
  title?: string;
  description?: string;
  priority?: WorkPriority;
  dueDate?: string | null;
  assigneeId?: number | null;
  /** The service-plan task the order is for (from the due list): completing the order records it done. */
  serviceTaskKey?: string;
}

export interface CompleteRequest {
  value?: number;
  unit?: string;
  note?: string;
  lockoutConfirmed?: boolean;
  manualCheck?: ManualCheck;
  /** The top-up step of a top-up order: what was added (the value is the volume). */
  topUp?: { liquid: 'water' | 'premix' | 'glycol'; premixPercent: number | null };
}

/** HTTP calls of the work feature, as Observables (HttpClient's own, one request per subscription); the server decides every permission and the opening check. */
@Injectable({ providedIn: 'root' })
export class WorkApi {
  private readonly http = inject(HttpClient);
  /** The templates change only with a release: one request, shared by every caller (asked again after a failure). */
  private templatesCache: Observable<WorkTemplate[]> | null = null;

  templates(): Observable<WorkTemplate[]> {
    this.templatesCache ??= this.http.get<WorkTemplate[]>('/api/work-order-templates').pipe(
      catchError((e: unknown) => {
        this.templatesCache = null;
        return throwError(() => e);
      }),
      shareReplay(1),
    );
    return this.templatesCache;
  }

  list(f: ListFilter = {}): Observable<WorkOrderSummary[]> {
    const params: Record<string, string> = {};
    if (f.status?.length) params['status'] = f.status.join(',');
    if (f.engineId) params['engineId'] = String(f.engineId);
    if (f.siteId) params['siteId'] = String(f.siteId);
    if (f.assigneeId) params['assigneeId'] = String(f.assigneeId);
    if (f.mine) params['mine'] = '1';
    return this.http.get<WorkOrderSummary[]>('/api/work-orders', { params });
  }

  get(id: number): Observable<WorkOrderDetail> {
    return this.http.get<WorkOrderDetail>(`/api/work-orders/${id}`);
  }

  create(body: CreateRequest): Observable<WorkOrderDetail> {
    return this.http.post<WorkOrderDetail>('/api/work-orders', body);
  }

  plan(id: number, body: { assigneeId?: number | null; dueDate?: string | null; priority?: WorkPriority }): Observable<WorkOrderDetail> {
    return this.http.patch<WorkOrderDetail>(`/api/work-orders/${id}`, body);
  }

  transition(id: number, to: WorkStatus, note?: string): Observable<WorkOrderDetail> {
    return this.http.post<WorkOrderDetail>(`/api/work-orders/${id}/transition`, note ? { to, note } : { to });
  }

  completeStep(id: number, stepId: number, body: CompleteRequest): Observable<WorkOrderDetail> {
    return this.http.post<WorkOrderDetail>(`/api/work-orders/${id}/steps/${stepId}/complete`, body);
  }

  /** Saves what is typed into a step without completing it (the server keeps it for a reload or another device). */
  saveDraft(id: number, stepId: number, body: { value?: number | null; unit?: string; note?: string }): Observable<WorkOrderDetail> {
    return this.http.patch<WorkOrderDetail>(`/api/work-orders/${id}/steps/${stepId}`, body);
  }

  /** Records the order's coolant test from its steps (once per order; a second call answers 409 with the recorded test). */
  recordCoolantTest(id: number, method?: string): Observable<{ coolantTest: OrderCoolantTest; order: WorkOrderDetail }> {
    return this.http.post<{ coolantTest: OrderCoolantTest; order: WorkOrderDetail }>(`/api/work-orders/${id}/coolant-test`, method ? { method } : {});
  }

  addPart(id: number, body: { kind: string; quantity: number; unit: 'L' | 'gal' | 'pcs'; description?: string }): Observable<WorkOrderDetail> {
    return this.http.post<WorkOrderDetail>(`/api/work-orders/${id}/parts`, body);
  }

  addAmendment(id: number, text: string): Observable<WorkOrderDetail> {
    return this.http.post<WorkOrderDetail>(`/api/work-orders/${id}/amendments`, { text });
  }

  upload(id: number, file: File, stepId: number | null): Observable<unknown> {
    const form = new FormData();
    if (stepId) form.append('stepId', String(stepId));
    form.append('file', file, file.name);
    return this.http.post(`/api/work-orders/${id}/attachments`, form);
  }

  /** Attachments need the token, so they are fetched as blobs and shown through object URLs. */
  attachmentBlob(url: string): Observable<Blob> {
    return this.http.get(url, { responseType: 'blob' });
  }

  openingCheck(engineId: number, lockoutConfirmed = false): Observable<OpeningCheck> {
    // never from the service worker's cache: the opening check is live data or nothing (ngsw-bypass)
    return this.http.get<OpeningCheck>(`/api/engines/${engineId}/opening-check`, {
      params: { lockoutConfirmed: String(lockoutConfirmed) },
      headers: { 'ngsw-bypass': 'true' },
    });
  }

  /** Readings of one channel as buckets (at most `points`), stored units. */
  readings(engineId: number, channel: string, from: number, to: number, points: number): Observable<ReadingBucket[]> {
    const params = { channel, from: String(Math.floor(from)), to: String(Math.ceil(to)), points: String(Math.max(1, Math.min(2000, Math.round(points)))) };
    return this.http.get<{ buckets?: ReadingBucket[] }>(`/api/engines/${engineId}/readings`, { params }).pipe(map((r) => r.buckets ?? []));
  }

  /** Coolant tests of an engine, newest first (server/routes/coolant.ts). */
  coolantTests(engineId: number): Observable<CoolantTestSummary[]> {
    return this.http.get<CoolantTestSummary[]>(`/api/engines/${engineId}/coolant-tests`);
  }

  sites(): Observable<{ id: number; name: string }[]> {
    return this.http.get<{ id: number; name: string }[]>('/api/sites');
  }

  /** The engine facts a coolant decision needs (GET /api/engines/:id answers more). */
  engineFacts(id: number): Observable<EngineFacts> {
    return this.http.get<EngineFacts>(`/api/engines/${id}`);
  }

  engines(): Observable<{ id: number; name: string; siteId: number }[]> {
    return this.http.get<{ id: number; name: string; siteId: number }[]>('/api/engines');
  }

  assignees(): Observable<Assignee[]> {
    return this.http.get<Assignee[]>('/api/work-orders/assignees');
  }
}

/** The server's words for a failed call, or a plain fallback. */
export function errorText(err: unknown): string {
  if (err instanceof HttpErrorResponse) {
    if (isNoAnswer(err)) return 'The server cannot be reached. Try again.';
    const e = err.error as { error?: string } | null;
    if (e && typeof e.error === 'string') return e.error;
    return `The server answered ${err.status}.`;
  }
  return err instanceof Error ? err.message : 'Something went wrong.';
}
