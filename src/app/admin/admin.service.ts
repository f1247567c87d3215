import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { Observable } from 'rxjs';
import { Role } from '../core/user';
import { AdminUser, Device, DeviceWithSecret, Engine, EngineInput, IngestReport, MetricMapEntry, Site } from './admin-types';

/** HTTP for the administration screens. Values leave in SI units; the server checks every call's role itself. */
@Injectable({ providedIn: 'root' })
export class AdminService {
  private readonly http = inject(HttpClient);

  users(): Observable<AdminUser[]> {
    return this.http.get<AdminUser[]>('/api/users');
  }
  createUser(body: { email: string; name: string; password: string; role: Role }): Observable<AdminUser> {
    return this.http.post<AdminUser>('/api/users', body);
  }
  updateUser(id: number, patch: Partial<{ email: string; name: string; password: string; role: Role; disabled: boolean }>): Observable<AdminUser> {
    return this.http.patch<AdminUser>(`/api/users/${id}`, patch);
  }
  /** Limit a user to these sites; an empty list: every site. */
  setUserSites(id: number, siteIds: number[]): Observable<AdminUser> {
    return this.http.put<AdminUser>(`/api/users/${id}/sites`, { siteIds });
  }

  sites(): Observable<Site[]> {
    return this.http.get<Site[]>('/api/sites');
  }
  createSite(body: { name: string; timeZone: string; designLowTempC?: number | null }): Observable<Site> {
    return this.http.post<Site>('/api/sites', body);
  }
  updateSite(id: number, patch: Partial<{ name: string; timeZone: string; designLowTempC: number | null }>): Observable<Site> {
    return this.http.patch<Site>(`/api/sites/${id}`, patch);
  }
  retireSite(id: number): Observable<Site> {
    return this.http.delete<Site>(`/api/sites/${id}`);
  }

  engines(): Observable<Engine[]> {
    return this.http.get<Engine[]>('/api/engines');
  }
  createEngine(body: EngineInput): Observable<Engine> {
    return this.http.post<Engine>('/api/engines', body);
  }
  updateEngine(id: number, patch: Partial<EngineInput>): Observable<Engine> {
    return this.http.patch<Engine>(`/api/engines/${id}`, patch);
  }
  retireEngine(id: number): Observable<Engine> {
    return this.http.delete<Engine>(`/api/engines/${id}`);
  }

  devices(): Observable<Device[]> {
    return this.http.get<Device[]>('/api/devices');
  }
  createDevice(body: {
    engineId: number;
    username?: string;
    sparkplug?: { groupId: string; edgeNodeId: string; deviceId?: string };
  }): Observable<DeviceWithSecret> {
    return this.http.post<DeviceWithSecret>('/api/devices', body);
  }
  /** A Sparkplug gateway's metric names to our channels; applies from its next birth certificate. */
  setMetricMap(id: number, map: Record<string, MetricMapEntry>): Observable<Device> {
    return this.http.put<Device>(`/api/devices/${id}/metric-map`, map);
  }
  rotateDevice(id: number): Observable<DeviceWithSecret> {
    return this.http.post<DeviceWithSecret>(`/api/devices/${id}/rotate`, {});
  }
  revokeDevice(id: number): Observable<Device> {
    return this.http.post<Device>(`/api/devices/${id}/revoke`, {});
  }
  ingest(): Observable<IngestReport> {
    return this.http.get<IngestReport>('/api/admin/ingest');
  }
}
