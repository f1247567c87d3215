import { Routes } from '@angular/router';

/** Mounted under /admin with the admin role guard (app.routes.ts). */
export const ADMIN_ROUTES: Routes = [
  {
    path: '',
    loadComponent: () => import('./admin-shell').then((m) => m.AdminShell),
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'users' },
      { path: 'users', title: 'Users · Administration · Jacketwatch', loadComponent: () => import('./users-page').then((m) => m.UsersPage) },
      { path: 'sites', title: 'Sites · Administration · Jacketwatch', loadComponent: () => import('./sites-page').then((m) => m.SitesPage) },
      { path: 'engines', title: 'Engines · Administration · Jacketwatch', loadComponent: () => import('./engines-page').then((m) => m.EnginesPage) },
      {
        path: 'additive',
        title: 'Additive · Administration · Jacketwatch',
        loadComponent: () => import('../coolant/additive-profile-page').then((m) => m.AdditiveProfilePage),
      },
      { path: 'devices', title: 'Devices · Administration · Jacketwatch', loadComponent: () => import('./devices-page').then((m) => m.DevicesPage) },
    ],
  },
];
