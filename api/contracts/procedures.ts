import type { Procedure } from '../../procedures/schema';

export type ProcedureStatus = 'draft' | 'approved' | 'retired';

/** A procedure version as lists show it. */
export interface ProcedureVersionSummary {
  id: string;
  key: string;
  version: number;
  title: string;
  machineKind: string;
  status: ProcedureStatus;
  checksum: string;
  approvedAt: string | null;
}

export interface ProcedureVersionDetail extends ProcedureVersionSummary {
  body: Procedure;
}
