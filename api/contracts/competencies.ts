import { z } from 'zod';
import type { Role } from './roles';
import type { PersonRef } from './records';

/** Authorisations expiring within this many days are marked, and listed for reminders. */
export const EXPIRING_WITHIN_DAYS = 30;

/** The longest an authorisation may run before it must be renewed (our choice: a guard against mistyped years). */
export const LONGEST_AUTHORISATION_YEARS = 5;

/**
 * A competent person certifies that someone is trained and authorised to run a procedure, until a date
 * (29 CFR 1910.147 (c)(7)(iv): each name and date certified; PUWER reg 9: training for users).
 * They sign it with their own password, as every signature in Setwright is signed.
 */
export const grantSchema = z.object({
  personId: z.uuid({ error: 'Choose the person to authorise.' }),
  procedureKey: z.string({ error: 'Choose the procedure.' }).trim().min(1, 'Choose the procedure.').max(60),
  expiresOn: z.iso.date({ error: 'Enter the expiry date as a date (YYYY-MM-DD).' }),
  note: z.string().trim().max(1000, 'Keep the note under 1000 characters.').optional(),
  password: z.string({ error: 'Enter your password to sign the authorisation.' }).min(1, 'Enter your password to sign the authorisation.').max(200),
});
export type GrantRequest = z.infer<typeof grantSchema>;

export const revokeSchema = z.object({
  reason: z.string({ error: 'Say why the authorisation is withdrawn.' }).trim().min(5, 'Say why the authorisation is withdrawn (at least a few words).').max(1000),
});
export type RevokeRequest = z.infer<typeof revokeSchema>;

/** current: valid beyond the warning window; expiring: valid, but ends within 30 days; expired: past its date. */
export type AuthorisationState = 'current' | 'expiring' | 'expired';
export const AUTHORISATION_STATE_LABELS: Record<AuthorisationState, string> = {
  current: 'Authorised',
  expiring: 'Expiring soon',
  expired: 'Expired',
};

/** How an authorisation ended, when it has: withdrawn by a competent person, or replaced by a renewal. */
export type AuthorisationEnd = 'revoked' | 'renewed';

export interface AuthorisationView {
  id: string;
  person: PersonRef;
  procedureKey: string;
  procedureTitle: string;
  grantedBy: PersonRef;
  grantedAt: string;
  /** The last day it is valid (YYYY-MM-DD). */
  expiresOn: string;
  note: string | null;
  state: AuthorisationState;
  /** Days from today (in the workshop's time zone) to the expiry date; negative once expired. */
  daysLeft: number;
  endedAt: string | null;
  endedBy: PersonRef | null;
  endKind: AuthorisationEnd | null;
  endReason: string | null;
}

/** One person on one procedure. */
export interface CompetencyCell {
  /** Records they performed (not voided) in which a competent person witnessed a step run with power on. */
  witnessedRuns: number;
  /** Records they performed that were signed off. */
  signedRuns: number;
  lastSignedAt: string | null;
  /** The authorisation in force or lapsed (not revoked or renewed), if any. */
  authorisation: AuthorisationView | null;
}

export interface MatrixProcedure {
  key: string;
  title: string;
}

export interface MatrixRow {
  person: PersonRef & { email: string; roles: Role[] };
  /** Keyed by procedure key; a procedure missing here has no runs and no authorisation. */
  cells: Record<string, CompetencyCell>;
}

export interface CompetencyMatrix {
  /** Today in the workshop's time zone (YYYY-MM-DD), the day expiry is judged against. */
  today: string;
  expiringWithinDays: number;
  procedures: MatrixProcedure[];
  rows: MatrixRow[];
}

/** The CSV export's columns, one line per person and procedure. */
export const MATRIX_CSV_COLUMNS = [
  'Person',
  'Email',
  'Roles',
  'Procedure',
  'Procedure key',
  'Witnessed runs',
  'Signed runs',
  'Last signed run',
  'Authorisation',
  'Granted by',
  'Granted on',
  'Expires on',
  'Note',
] as const;
