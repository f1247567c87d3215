import { Routes } from '@angular/router';

/** Mounted under /alarms for every signed-in user (app.routes.ts); the admin and planner pages guard themselves. */
export const ALARM_ROUTES: Routes = [
  { path: '', pathMatch: 'full', title: 'Alarms · Jacketwatch', loadComponent: () => import('./alarm-list-page').then((m) => m.AlarmListPage) },
  { path: ':id', title: 'Alarm · Jacketwatch', loadComponent: () => import('./alarm-detail-page').then((m) => m.AlarmDetailPage) },
];
