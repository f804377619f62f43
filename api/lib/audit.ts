import type { Transaction } from 'sequelize';
import { AuditEvent } from '../modules/signoff/model';

/** The things the audit trail records. */
export type AuditAction =
  | 'record.started'
  | 'step.saved'
  | 'step.witnessed'
  | 'record.finished'
  | 'record.voided'
  | 'record.returned'
  | 'record.signed_off'
  | 'record.addendum'
  | 'record.downloaded'
  | 'records.exported'
  | 'record.checked'
  | 'person.invited'
  | 'person.invitation_resent'
  | 'person.password_set'
  | 'person.roles_changed'
  | 'person.deactivated'
  | 'person.reactivated';

/** Append one event to the audit trail (in the caller's transaction when there is one). */
export async function audit(
  action: AuditAction,
  actorId: string | null,
  recordId: string | null,
  detail: Record<string, unknown> = {},
  transaction?: Transaction,
): Promise<void> {
  await AuditEvent.create({ action, actorId, recordId, detail }, { transaction });
}
