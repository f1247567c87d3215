import { Routes } from '@angular/router';
import { roleGuard } from '../core/role.guard';

/** Mounted under /alarms for every signed-in user (app.routes.ts); the admin and planner pages guard themselves. */
export const ALARM_ROUTES: Routes = [
  { path: '', pathMatch: 'full', title: 'Alarms · Jacketwatch', loadComponent: () => import('./alarm-list-page').then((m) => m.AlarmListPage) },
  { path: 'performance', title: 'Alarm performance · Jacketwatch', loadComponent: () => import('./performance-page').then((m) => m.PerformancePage) },
  { path: 'rules', title: 'Alarm rules · Jacketwatch', canMatch: [roleGuard('admin')], loadComponent: () => import('./rules-page').then((m) => m.RulesPage) },
  { path: 'mail', title: 'Alarm mail · Jacketwatch', canMatch: [roleGuard('admin')], loadComponent: () => import('./mail-page').then((m) => m.MailPage) },
  {
    path: 'on-call',
    title: 'On-call rota · Jacketwatch',
    canMatch: [roleGuard('planner', 'admin')],
    loadComponent: () => import('./on-call-page').then((m) => m.OnCallPage),
  },
  { path: ':id', title: 'Alarm · Jacketwatch', loadComponent: () => import('./alarm-detail-page').then((m) => m.AlarmDetailPage) },
];
