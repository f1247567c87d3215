import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import { ListPage } from '../core/list-page';
import type { ListFilter } from './work-api';
import { WorkOrderSummary } from './work-types';

/** The work-order list paged and filtered on the server (GET /api/work-orders?offset=...&limit=...). */
@Injectable({ providedIn: 'root' })
export class WorkListApi {
  private readonly http = inject(HttpClient);

  page(f: ListFilter, offset: number, limit: number): Promise<ListPage<WorkOrderSummary>> {
    const params: Record<string, string> = { offset: String(offset), limit: String(limit) };
    if (f.status?.length) params['status'] = f.status.join(',');
    if (f.engineId) params['engineId'] = String(f.engineId);
    if (f.siteId) params['siteId'] = String(f.siteId);
    if (f.assigneeId) params['assigneeId'] = String(f.assigneeId);
    if (f.mine) params['mine'] = '1';
    return firstValueFrom(this.http.get<ListPage<WorkOrderSummary>>('/api/work-orders', { params }));
  }

  /** Every page (for the CSV export), at the largest page the server allows. */
  async all(f: ListFilter): Promise<WorkOrderSummary[]> {
    const out: WorkOrderSummary[] = [];
    for (let offset = 0; ; offset += 500) {
      const p = await this.page(f, offset, 500);
      out.push(...p.items);
      if (!p.items.length || offset + p.items.length >= p.total) return out;
    }
  }
}
