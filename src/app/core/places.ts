import type { Role } from '@setwright/contracts/roles';

/** A place in the app, who may open it, and what it is for. */
export interface Place {
  path: string;
  label: string;
  icon: string;
  roles: readonly Role[];
  summary: string;
}

const EVERYONE: readonly Role[] = ['trainee', 'competent_person', 'auditor', 'workshop_admin'];

/** The places that exist today; the shell and Today list the ones the signed-in person may open. */
export const PLACES: readonly Place[] = [
  { path: '/today', label: 'Today', icon: 'home', roles: EVERYONE, summary: 'Your work: what to do next.' },
  { path: '/to-sign', label: 'To sign', icon: 'approval', roles: ['competent_person'], summary: 'Finished records waiting for your review and signature.' },
  { path: '/machines', label: 'Machines', icon: 'precision_manufacturing', roles: EVERYONE, summary: 'The machine register and each saw’s figures.' },
  { path: '/blades', label: 'Blades', icon: 'donut_large', roles: EVERYONE, summary: 'Blade types and stock, the blade on each saw, its break-in and history.' },
  { path: '/workshop-maths', label: 'Workshop maths', icon: 'calculate', roles: EVERYONE, summary: 'Blade speed, pitch, tension, belts and squareness, worked out.' },
  {
    path: '/records',
    label: 'Records',
    icon: 'inventory_2',
    roles: ['auditor', 'competent_person', 'workshop_admin'],
    summary: 'Signed set-up records: search, PDFs, Record check and evidence packs.',
  },
  {
    path: '/procedures',
    label: 'Procedures',
    icon: 'menu_book',
    roles: ['workshop_admin', 'competent_person', 'auditor'],
    summary: 'The procedure library: every version, drafts and approval.',
  },
  { path: '/people', label: 'People', icon: 'group', roles: ['workshop_admin'], summary: 'Everyone who signs in: invitations, roles, and who is active.' },
  {
    path: '/people/competencies',
    label: 'Competencies',
    icon: 'workspace_premium',
    roles: ['competent_person', 'auditor', 'workshop_admin'],
    summary: 'Who has run and been authorised for each procedure, and when it expires.',
  },
];

/**
 * The place a page belongs to: the one whose path is the longest that the address starts with, so
 * /people/competencies is under Competencies alone and not under People as well.
 */
export function placeOf(places: readonly Place[], url: string): string | null {
  const path = url.split(/[?#]/)[0]!;
  let best: string | null = null;
  for (const p of places) {
    const within = path === p.path || path.startsWith(p.path + '/');
    if (within && (!best || p.path.length > best.length)) best = p.path;
  }
  return best;
}

/** The runner (one record, /records/:id) is a focused page: the list of places folds away so the step has the width. */
export function isFocusedPage(url: string): boolean {
  return /^\/records\/[^/?#]+\/?(?:[?#].*)?$/.test(url);
}
