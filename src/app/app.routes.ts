import type { Routes } from '@angular/router';
import { roleGuard, signedInGuard, signedOutGuard } from './core/guards';

export const routes: Routes = [
  {
    path: 'sign-in',
    canMatch: [signedOutGuard],
    title: 'Sign in · Setwright',
    loadComponent: () => import('./features/sign-in/sign-in').then((m) => m.SignIn),
  },
  {
    path: '',
    canMatch: [signedInGuard],
    loadComponent: () => import('./core/shell').then((m) => m.Shell),
    children: [
      { path: '', pathMatch: 'full', redirectTo: 'today' },
      { path: 'today', title: 'Today · Setwright', loadComponent: () => import('./features/today/today').then((m) => m.Today) },
      {
        path: 'machines',
        title: 'Machines · Setwright',
        loadComponent: () => import('./features/machines/machine-list').then((m) => m.MachineList),
      },
      {
        path: 'workshop-maths',
        title: 'Workshop maths · Setwright',
        loadComponent: () => import('./features/workshop-maths/workshop-maths').then((m) => m.WorkshopMaths),
      },
      {
        path: 'procedures',
        canMatch: [roleGuard('workshop_admin', 'competent_person', 'auditor')],
        title: 'Procedures · Setwright',
        loadComponent: () => import('./features/procedures/procedure-library').then((m) => m.ProcedureLibrary),
      },
      {
        path: 'procedures/:key/versions/:version',
        canMatch: [roleGuard('workshop_admin', 'competent_person', 'auditor')],
        title: 'Procedure version · Setwright',
        loadComponent: () => import('./features/procedures/version-page').then((m) => m.VersionPage),
      },
      {
        path: 'machines/:id',
        title: 'Machine · Setwright',
        loadComponent: () => import('./features/machines/machine-page').then((m) => m.MachinePage),
      },
      {
        path: 'to-sign',
        title: 'To sign · Setwright',
        canMatch: [roleGuard('competent_person')],
        loadComponent: () => import('./features/sign-off/sign-off-queue').then((m) => m.SignOffQueue),
      },
      {
        path: 'to-sign/:id',
        title: 'Review · Setwright',
        loadComponent: () => import('./features/sign-off/sign-off-review').then((m) => m.SignOffReview),
      },
      {
        path: 'records/:id',
        title: 'Record · Setwright',
        loadComponent: () => import('./features/records/record-runner').then((m) => m.RecordRunner),
      },
    ],
  },
  { path: '**', redirectTo: 'today' },
];
