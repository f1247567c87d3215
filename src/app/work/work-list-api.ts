import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { EMPTY, Observable, expand, reduce } from 'rxjs';
import { ListPage } from '../core/list-page';
import type { ListFilter } from './work-api';
import { WorkOrderSummary } from './work-types';

/** The work-order list paged and filtered on the server (GET /api/work-orders?offset=...&limit=...). */
@Injectable({ providedIn: 'root' })
export class WorkListApi {
  private readonly http = inject(HttpClient);

  page(f: ListFilter, offset: number, limit: number): Observable<ListPage<WorkOrderSummary>> {
    const params: Record<string, string> = { offset: String(offset), limit: String(limit) };
    if (f.status?.length) params['status'] = f.status.join(',');
    if (f.engineId) params['engineId'] = String(f.engineId);
    if (f.siteId) params['siteId'] = String(f.siteId);
    if (f.assigneeId) params['assigneeId'] = String(f.assigneeId);
    if (f.mine) params['mine'] = '1';
    return this.http.get<ListPage<WorkOrderSummary>>('/api/work-orders', { params });
  }

  /** Every page (for the CSV export), at the largest page the server allows, one after the other. */
  all(f: ListFilter): Observable<WorkOrderSummary[]> {
    const limit = 500;
    return this.page(f, 0, limit).pipe(
      expand((p) => (p.items.length && p.offset + p.items.length < p.total ? this.page(f, p.offset + limit, limit) : EMPTY)),
      reduce((out: WorkOrderSummary[], p) => out.concat(p.items), []),
    );
  }
}
