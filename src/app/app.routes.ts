import { Routes } from '@angular/router';
import { roleGuard, signedInGuard, signedOutGuard } from './core/role.guard';

// Every feature screen is lazy, so the chart library only loads on the screens that draw charts.
export const routes: Routes = [
  { path: '', pathMatch: 'full', redirectTo: 'fleet' },
  { path: 'sign-in', title: 'Sign in · Jacketwatch', canMatch: [signedOutGuard], loadComponent: () => import('./auth/sign-in').then((m) => m.SignIn) },
  {
    path: 'fleet',
    title: 'Fleet board · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./fleet/fleet-board').then((m) => m.FleetBoard),
  },
  {
    path: 'engines/:id',
    title: 'Engine · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./engine/engine-page').then((m) => m.EnginePage),
  },
  {
    path: 'settings',
    title: 'Settings · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./settings/preferences-page').then((m) => m.PreferencesPage),
  },
  {
    path: 'admin',
    title: 'Administration · Jacketwatch',
    canMatch: [roleGuard('admin')],
    loadChildren: () => import('./admin/admin.routes').then((m) => m.ADMIN_ROUTES),
  },
  { path: 'alarms', canMatch: [signedInGuard], loadChildren: () => import('./alarms/alarms.routes').then((m) => m.ALARM_ROUTES) },
  { path: 'work', canMatch: [signedInGuard], loadChildren: () => import('./work/work.routes').then((m) => m.WORK_ROUTES) },
  {
    path: 'engines/:id/history',
    title: 'Service history · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./engine/engine-history-page').then((m) => m.EngineHistoryPage),
  },
  {
    path: 'engines/:id/coolant',
    title: 'Coolant · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./coolant/engine-coolant-page').then((m) => m.EngineCoolantPage),
  },
  {
    path: 'calculators',
    title: 'Coolant calculators · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./coolant/calculators-page').then((m) => m.CalculatorsPage),
  },
  {
    path: 'due',
    title: 'Service due · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./coolant/due-list-page').then((m) => m.DueListPage),
  },
  {
    path: 'not-allowed',
    title: 'Not for your role · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./errors/not-allowed-page').then((m) => m.NotAllowedPage),
  },
  {
    path: '**',
    title: 'Page not found · Jacketwatch',
    canMatch: [signedInGuard],
    loadComponent: () => import('./errors/not-found-page').then((m) => m.NotFoundPage),
  },
];
