import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import { EngineHistory } from './engine-history-types';

/** HTTP for an engine's service history. */
@Injectable({ providedIn: 'root' })
export class EngineHistoryService {
  private readonly http = inject(HttpClient);

  history(engineId: number): Observable<EngineHistory> {
    return this.http.get<EngineHistory>(`/api/engines/${engineId}/history`);
  }
}
