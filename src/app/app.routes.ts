import type { Routes } from '@angular/router';
import { signedInGuard, signedOutGuard } from './core/guards';

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
    ],
  },
  { path: '**', redirectTo: 'today' },
];
