import { z } from 'zod';
import type { Procedure } from '../../procedures/schema';
import type { PersonRef } from './records';

export type ProcedureStatus = 'draft' | 'approved' | 'retired';

/** Our names for the states of a procedure version. */
export const PROCEDURE_STATUS_LABELS: Record<ProcedureStatus, string> = {
  draft: 'Draft',
  approved: 'Approved',
  retired: 'Retired',
};

/** A procedure version as lists show it. */
export interface ProcedureVersionSummary {
  id: string;
  key: string;
  version: number;
  title: string;
  machineKind: string;
  status: ProcedureStatus;
  checksum: string;
  /** 'pack' when loaded from the shipped files, 'editor' when written in the app. */
  source: 'pack' | 'editor';
  /** Who wrote it in the app (null for pack versions). */
  author: PersonRef | null;
  approvedBy: PersonRef | null;
  approvedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface ProcedureVersionDetail extends ProcedureVersionSummary {
  body: Procedure;
}

/** Start a draft: a copy of the current approved version, or of the version named here. */
export const startDraftSchema = z.object({
  from: z.number({ error: 'Name the version to copy as a number.' }).int().min(1).optional(),
});
export type StartDraftRequest = z.infer<typeof startDraftSchema>;

export const diffQuerySchema = z.object({
  /** The version to compare with; the current approved version when absent. */
  against: z.coerce.number({ error: 'Name a version number to compare with.' }).int().min(1).optional(),
});
