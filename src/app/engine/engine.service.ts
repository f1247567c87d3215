import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable, map } from 'rxjs';
import { ChannelKey } from '../../../shared/channels';
import { Engine, Site } from '../fleet/fleet-types';
import { Bucket } from './trend-series';
import { RAW_SOURCE, TrendSource } from './trend-source';

export interface ReadingsRequest {
  channel: ChannelKey;
  from: number;
  to: number;
  /** How many buckets at most: the chart's width in pixels. */
  points: number;
}

/** Buckets of one channel and where they came from (raw readings or per-minute summaries). */
export interface ReadingsResult extends TrendSource {
  buckets: Bucket[];
}

/** HTTP for the engine page. Everything arrives and leaves in SI units. */
@Injectable({ providedIn: 'root' })
export class EngineService {
  private readonly http = inject(HttpClient);

  engine(id: number): Observable<Engine> {
    return this.http.get<Engine>(`/api/engines/${id}`);
  }

  /** A standby engine's readiness to start, read again from the engine (undefined for other duties). */
  readiness(id: number): Observable<Engine['readiness']> {
    return this.engine(id).pipe(map((e) => e.readiness));
  }

  sites(): Observable<Site[]> {
    return this.http.get<Site[]>('/api/sites');
  }

  readings(engineId: number, q: ReadingsRequest): Observable<ReadingsResult> {
    const params = {
      channel: q.channel,
      from: String(Math.floor(q.from)),
      to: String(Math.ceil(q.to)),
      points: String(Math.max(1, Math.min(2000, Math.round(q.points)))),
    };
    return this.http
      .get<Partial<ReadingsResult>>(`/api/engines/${engineId}/readings`, { params })
      .pipe(map((r) => ({ ...RAW_SOURCE, ...r, buckets: r.buckets ?? [] })));
  }
}
