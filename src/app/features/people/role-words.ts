import { ROLE_LABELS, ROLES, type Role } from '@setwright/contracts/roles';

/** The roles in the order the pickers show them, with what each may do. */
export const ROLE_CHOICES: readonly { role: Role; label: string; does: string }[] = ROLES.map((role) => ({
  role,
  label: ROLE_LABELS[role],
  does: {
    trainee: 'runs procedures at the saw',
    competent_person: 'witnesses powered steps and signs records off',
    auditor: 'reads and exports the records',
    workshop_admin: 'manages people, machines and procedures',
  }[role],
}));

export const roleLabel = (role: Role) => ROLE_LABELS[role];
