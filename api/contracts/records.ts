import { z } from 'zod';
import type { Procedure } from '../../procedures/schema';
import type { StepEvaluation } from '../../procedures/engine';

export const RECORD_STATUSES = ['underway', 'ready_for_signoff', 'signed_off', 'returned', 'voided'] as const;
export type RecordStatus = (typeof RECORD_STATUSES)[number];
export type RecordResult = 'passed' | 'failed';

export const RECORD_STATUS_LABELS: Record<RecordStatus, string> = {
  underway: 'Underway',
  ready_for_signoff: 'Ready for sign-off',
  signed_off: 'Signed off',
  returned: 'Returned',
  voided: 'Voided',
};

export const startRecordSchema = z.object({
  /** A client-made id, so a record started offline is accepted once. */
  id: z.uuid({ error: 'A record id is a UUID.' }).optional(),
  machineId: z.uuid({ error: 'Choose a machine.' }),
  procedureKey: z.string().min(1, 'Choose a procedure.').max(60),
});
export type StartRecordRequest = z.infer<typeof startRecordSchema>;

export const entryValueSchema = z.union([
  z.number().finite(),
  z.string().max(2000),
  z.boolean(),
  z.array(z.uuid({ error: 'A photo id is a UUID.' })).max(10),
  z.null(),
]);

export const stepEntryRequestSchema = z.object({
  idempotencyKey: z.uuid({ error: 'Each entry needs a UUID idempotency key.' }),
  stepId: z.string().min(1).max(60),
  values: z.record(z.string().max(60), entryValueSchema),
  correctiveNote: z.string().trim().max(2000, 'Keep the note under 2000 characters.').optional(),
  /** A competent person's own sign-in, entered on the tablet, for a step run with power on. */
  witness: z
    .object({
      email: z.string().trim().pipe(z.email({ error: 'Enter the witness’s email address.' })),
      password: z.string().min(1, 'The witness enters their password.').max(200),
    })
    .optional(),
});
export type StepEntryRequest = z.infer<typeof stepEntryRequestSchema>;

export const voidRecordSchema = z.object({
  reason: z.string().trim().min(3, 'Say why the record is voided.').max(1000),
});

export interface PersonRef {
  id: string;
  displayName: string;
}

export interface StepEntryView {
  id: string;
  stepId: string;
  attempt: number;
  values: Record<string, unknown>;
  evaluation: StepEvaluation;
  outcome: 'done' | 'out_of_limits';
  correctiveNote: string | null;
  enteredBy: PersonRef;
  witnessedBy: PersonRef | null;
  witnessedAt: string | null;
  idempotencyKey: string;
  createdAt: string;
}

export interface RecordSummary {
  id: string;
  status: RecordStatus;
  result: RecordResult | null;
  machine: { id: string; name: string; assetTag: string };
  procedure: { id: string; key: string; version: number; title: string };
  startedBy: PersonRef;
  createdAt: string;
  finishedAt: string | null;
}

/** A record as it stands: GET /api/records/:id?without=procedure answers this (the procedure's body is immutable per version). */
export interface RecordState extends RecordSummary {
  machineSpec: Record<string, unknown>;
  /** Every attempt, oldest first; the latest attempt of a step is the one that counts. */
  entries: StepEntryView[];
  voidReason: string | null;
}

export interface RecordDetail extends RecordState {
  procedureBody: Procedure;
}
