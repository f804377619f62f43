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
    // Where invitation links land: open to anyone holding a link, signed in or not.
    path: 'set-password',
    title: 'Set your password · Setwright',
    loadComponent: () => import('./features/people/set-password').then((m) => m.SetPassword),
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
        // Full match: otherwise this guard would also catch the pages under it (/procedures/…).
        pathMatch: 'full',
        canMatch: [roleGuard('workshop_admin', 'competent_person', 'auditor')],
        title: 'Procedures · Setwright',
        loadComponent: () => import('./features/procedures/procedure-library').then((m) => m.ProcedureLibrary),
      },
      {
        path: 'procedures/:key/versions/:version',
        canMatch: [roleGuard('workshop_admin', 'competent_person', 'auditor')],
        title: 'Procedure version · Setwright',
        loadComponent: () => import('./features/procedures/version-page').then((m) => m.VersionPage),
        // A draft with unsaved changes asks before it is left.
        canDeactivate: [(page: { mayLeave(): boolean }) => page.mayLeave()],
      },
      {
        path: 'machines/new',
        canMatch: [roleGuard('workshop_admin')],
        title: 'Register a machine · Setwright',
        loadComponent: () => import('./features/machines/machine-edit').then((m) => m.MachineEdit),
      },
      {
        path: 'machines/:id/edit',
        canMatch: [roleGuard('workshop_admin')],
        title: 'Edit machine · Setwright',
        loadComponent: () => import('./features/machines/machine-edit').then((m) => m.MachineEdit),
      },
      {
        path: 'machines/:id',
        title: 'Machine · Setwright',
        loadComponent: () => import('./features/machines/machine-page').then((m) => m.MachinePage),
      },
      {
        path: 'to-sign',
        pathMatch: 'full',
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
        path: 'records',
        // Full match: otherwise this guard would also catch the pages under it (/records/…).
        pathMatch: 'full',
        canMatch: [roleGuard('auditor', 'competent_person', 'workshop_admin')],
        title: 'Records · Setwright',
        loadComponent: () => import('./features/archive/records-archive').then((m) => m.RecordsArchive),
      },
      {
        path: 'records/:id/check',
        title: 'Record check · Setwright',
        loadComponent: () => import('./features/archive/record-check').then((m) => m.RecordCheckPage),
      },
      {
        path: 'people',
        // Full match: otherwise this guard would also catch the pages under it (/people/…).
        pathMatch: 'full',
        canMatch: [roleGuard('workshop_admin')],
        title: 'People · Setwright',
        loadComponent: () => import('./features/people/people-list').then((m) => m.PeopleList),
      },
      {
        path: 'people/mail',
        canMatch: [roleGuard('workshop_admin')],
        title: 'Mail · Setwright',
        loadComponent: () => import('./features/people/mail-list').then((m) => m.MailList),
      },
      {
        path: 'records/:id',
        title: 'Record · Setwright',
        loadComponent: () => import('./features/records/record-runner').then((m) => m.RecordRunner),
      },
      {
        path: 'blades',
        title: 'Blades · Setwright',
        loadComponent: () => import('./features/blades/blades').then((m) => m.Blades),
      },
      {
        path: 'blades/machines/:id',
        title: 'Machine blades · Setwright',
        loadComponent: () => import('./features/blades/machine-blades').then((m) => m.MachineBlades),
      },
      {
        path: 'people/competencies',
        canMatch: [roleGuard('competent_person', 'workshop_admin', 'auditor')],
        title: 'Competency matrix · Setwright',
        loadComponent: () => import('./features/competencies/competency-matrix').then((m) => m.CompetencyMatrix),
      },
    ],
  },
  { path: '**', redirectTo: 'today' },
];
