/** What the admins are told when a signed, failed record tags a machine out. */
export interface TagOutNotice {
  machine: { id: string; name: string; assetTag: string; location: string };
  recordId: string;
  procedureTitle: string;
  /** Who did the failed work. */
  performer: string | null;
  /** When the failed record was finished at the machine. */
  doneAt: string;
  machineUrl: string;
  recordUrl: string;
}

/**
 * Tells the workshop admins about a tag-out (app.ts wires the mail module's notifyTaggedOut here;
 * tests pass their own). It logs its own failures and never throws.
 */
export type TagOutNotifier = (notice: TagOutNotice) => Promise<void>;
