import { z } from 'zod';
import type { RecordSummary } from './records';

export const SIGNATURE_MEANINGS = { performed: 'Performed by', witnessed: 'Witnessed by', approved: 'Approved by' } as const;
export type SignatureMeaning = keyof typeof SIGNATURE_MEANINGS;

export const signOffSchema = z.object({ password: z.string().min(1, 'Enter your password to sign.').max(200) });
export const finishWithSignatureSchema = z.object({
  password: z.string().min(1, 'Enter your password to sign the record as performed.').max(200),
  acceptFailed: z.boolean().default(false),
});
export const sendBackSchema = z.object({ reason: z.string().trim().min(5, 'Say what needs correcting (at least a few words).').max(2000) });
export const addendumSchema = z.object({
  text: z.string().trim().min(5, 'Write the addendum.').max(4000),
  password: z.string().min(1, 'Enter your password to sign the addendum.').max(200),
});

export interface SignatureView {
  id: string;
  meaning: SignatureMeaning;
  meaningLabel: string;
  printedName: string;
  signerId: string;
  signedAt: string;
  stepId: string | null;
}

export interface ReturnView {
  reason: string;
  returnedBy: string;
  returnedAt: string;
}

export interface AddendumView {
  id: string;
  printedName: string;
  text: string;
  signedAt: string;
  addendumHash: string;
}

/** What the sign-off queue shows at a glance. */
export interface QueueItem extends RecordSummary {
  outOfLimitsSteps: number;
  witnessedSteps: number;
}

/** The plain answer of a record check. */
export interface RecordCheck {
  recordId: string;
  intact: boolean;
  /** Each test made, in order, with its outcome. */
  checks: { name: string; ok: boolean; detail: string }[];
  storedHash: string | null;
  computedHash: string | null;
  previousHash: string | null;
  expectedPreviousHash: string | null;
  checkedAt: string;
}

export interface SignOffDetail {
  signatures: SignatureView[];
  returns: ReturnView[];
  addenda: AddendumView[];
  recordHash: string | null;
  previousHash: string | null;
  signedAt: string | null;
}

export interface AuditEventView {
  id: string;
  at: string;
  action: string;
  actor: string | null;
  detail: Record<string, unknown>;
}
