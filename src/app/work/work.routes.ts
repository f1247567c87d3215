import { inject } from '@angular/core';
import { CanMatchFn, Routes } from '@angular/router';
import { AuthService } from '../core/auth.service';

/** Planners and admins see all work at /work; everyone else falls through to their own. */
const plannerOnly: CanMatchFn = () => inject(AuthService).hasRole('planner', 'admin');

/** Mounted under /work for every signed-in user (app.routes.ts); the planner's overview guards itself. */
export const WORK_ROUTES: Routes = [
  {
    path: '',
    pathMatch: 'full',
    title: 'Work · Jacketwatch',
    canMatch: [plannerOnly],
    loadComponent: () => import('./work-list-page').then((m) => m.WorkListPage),
  },
  { path: '', pathMatch: 'full', redirectTo: 'mine' },
  { path: 'mine', title: 'My work · Jacketwatch', loadComponent: () => import('./my-work-page').then((m) => m.MyWorkPage) },
  { path: 'new', title: 'New work order · Jacketwatch', loadComponent: () => import('./work-new-page').then((m) => m.WorkNewPage) },
  { path: ':id/record', title: 'Service record · Jacketwatch', loadComponent: () => import('./work-record-page').then((m) => m.WorkRecordPage) },
  { path: ':id', title: 'Work order · Jacketwatch', loadComponent: () => import('./work-order-page').then((m) => m.WorkOrderPage) },
];
