import { z } from 'zod';
import { ROLES, roleSchema, type Role } from './roles';

/** Where a person stands: able to sign in, invited and not yet set up, or deactivated by an admin. */
export const PERSON_STATES = ['active', 'invited', 'deactivated'] as const;
export type PersonState = (typeof PERSON_STATES)[number];

export const PERSON_STATE_LABELS: Record<PersonState, string> = {
  active: 'Active',
  invited: 'Invited',
  deactivated: 'Deactivated',
};

/** A person as the People page lists them. */
export interface PersonSummary {
  id: string;
  email: string;
  displayName: string;
  roles: Role[];
  active: boolean;
  state: PersonState;
  /** When the newest unused invitation link stops working (invited people only). */
  invitationExpiresAt: string | null;
  createdAt: string;
}

const rolesField = z
  .array(roleSchema, { error: `Choose roles from: ${ROLES.join(', ')}.` })
  .min(1, 'Give at least one role.')
  .refine((roles) => new Set(roles).size === roles.length, 'Give each role once.');

export const inviteRequestSchema = z.object({
  email: z
    .string({ error: 'Enter their email address.' })
    .trim()
    .toLowerCase()
    .min(1, 'Enter their email address.')
    .max(254, 'That email address is too long.')
    .pipe(z.email({ error: 'Enter a valid email address.' })),
  displayName: z
    .string({ error: 'Enter their name as it should print on records.' })
    .trim()
    .min(2, 'Enter their name as it should print on records.')
    .max(120, 'Keep the name to 120 characters.'),
  roles: rolesField,
});
export type InviteRequest = z.infer<typeof inviteRequestSchema>;

export const rolesRequestSchema = z.object({ roles: rolesField });
export type RolesRequest = z.infer<typeof rolesRequestSchema>;

export const PASSWORD_MIN = 12;
/** bcrypt reads only the first 72 bytes of a password; longer ones would be cut short without a word. */
export const PASSWORD_MAX_BYTES = 72;

export const setPasswordRequestSchema = z.object({
  token: z
    .string({ error: 'The link has no token in it. Open the link from your invitation e-mail again.' })
    .regex(/^[A-Za-z0-9_-]{20,100}$/, 'This link is not complete. Open the link from your invitation e-mail again.'),
  password: z
    .string({ error: 'Choose a password.' })
    .min(PASSWORD_MIN, { error: `Use at least ${PASSWORD_MIN} characters.`, abort: true })
    .refine((p) => new TextEncoder().encode(p).length <= PASSWORD_MAX_BYTES, { error: 'Keep it to 72 characters or fewer (fewer with accented letters or symbols).', abort: true })
    .refine((p) => p.trim().length >= PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters that are not spaces.`),
});
export type SetPasswordRequest = z.infer<typeof setPasswordRequestSchema>;

export interface SetPasswordResponse {
  email: string;
  displayName: string;
}

/** A message the local SMTP stand-in received (development only). */
export interface StandInMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  links: string[];
}
