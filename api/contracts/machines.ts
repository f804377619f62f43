import { z } from 'zod';
import { horizontalBandsawSpecSchema } from './machine-spec';
import type { ScheduleView } from './schedules';

/** A machine as the register lists it. */
export interface MachineSummary {
  id: string;
  name: string;
  assetTag: string;
  location: string;
  kind: string;
  model: string;
  spec: Record<string, unknown>;
  /** A photo of the machine (from the photos module), shown on its page; null when there is none. */
  photoId?: string | null;
}

/** A machine's state, derived from its signed records and schedules: never stored, so it cannot drift. */
export const MACHINE_STATES = ['ready', 'check_due', 'tagged_out'] as const;
export type MachineState = (typeof MACHINE_STATES)[number];

export const MACHINE_STATE_LABELS: Record<MachineState, string> = {
  ready: 'Ready',
  check_due: 'Check due',
  tagged_out: 'Tagged out',
};

/** A signed, failed record that keeps the machine tagged out until a later record of the same procedure passes. */
export interface TagOutCause {
  recordId: string;
  procedureKey: string;
  procedureTitle: string;
  /** When the failed record was finished at the machine. */
  doneAt: string;
  signedAt: string;
}

export interface MachineStatus {
  state: MachineState;
  label: string;
  /** Every failed record not yet followed by a passing one of the same procedure (newest first). */
  taggedOutBy: TagOutCause[];
  /** How many scheduled checks are due or overdue now. */
  dueCount: number;
  /** The soonest due date among its schedules (past when something is due). */
  nextDueAt: string | null;
}

export interface MachineListItem extends MachineSummary {
  photoId: string | null;
  status: MachineStatus;
}

/** The blade on the machine now; filled in by the blades module (null until it knows). */
export interface CurrentBlade {
  id: string;
  label: string;
  fittedAt: string | null;
}

/** One signed record in the machine's history. */
export interface MachineHistoryItem {
  recordId: string;
  procedureKey: string;
  procedureTitle: string;
  result: 'passed' | 'failed' | null;
  startedBy: string;
  doneAt: string | null;
  signedAt: string | null;
}

/** A change of place, from the register. */
export interface MachineMove {
  at: string;
  from: string;
  to: string;
  by: string | null;
}

export interface MachineDetail extends MachineListItem {
  currentBlade: CurrentBlade | null;
  /** Each scheduled procedure with its due date and why. */
  schedules: ScheduleView[];
  /** Signed records, newest first. */
  history: MachineHistoryItem[];
  moves: MachineMove[];
  /** The procedures that may be started now: 'all', or (when tagged out) only these keys. */
  startable: 'all' | string[];
}

const text = (what: string, max: number) =>
  z.string({ error: `Enter the ${what}.` }).trim().min(1, `Enter the ${what}.`).max(max, `Keep the ${what} under ${max} characters.`);

const common = {
  name: text('machine’s name', 120),
  assetTag: text('asset tag', 40).regex(/^[A-Za-z0-9][A-Za-z0-9 ._\/-]*$/, 'Use letters, numbers, spaces and . _ / - in the asset tag.'),
  location: text('location', 120),
  model: z.string({ error: 'The model is text.' }).trim().max(120, 'Keep the model under 120 characters.').default(''),
  photoId: z.uuid({ error: 'A photo id is a UUID.' }).nullable().default(null),
};

/**
 * Register or change a machine (workshop admin). The specification is checked by the schema of
 * the machine's kind, so a bad figure comes back pointing at it ('#/spec/tensionRangeKgf/max').
 */
export const machineRequestSchema = z.discriminatedUnion(
  'kind',
  [z.object({ ...common, kind: z.literal('horizontal_bandsaw'), spec: horizontalBandsawSpecSchema })],
  { error: 'Choose a machine kind Setwright knows.' },
);
export type MachineRequest = z.infer<typeof machineRequestSchema>;
export type MachineRequestInput = z.input<typeof machineRequestSchema>;
