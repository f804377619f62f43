import { z } from 'zod';

/** The four roles; one person may hold several. */
export const ROLES = ['trainee', 'competent_person', 'auditor', 'workshop_admin'] as const;
export const roleSchema = z.enum(ROLES);
export type Role = z.infer<typeof roleSchema>;

export const ROLE_LABELS: Record<Role, string> = {
  trainee: 'Trainee',
  competent_person: 'Competent person',
  auditor: 'Auditor',
  workshop_admin: 'Workshop admin',
};
