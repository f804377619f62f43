import { z } from 'zod';

/** Events after which a procedure is due again, whatever its interval says. */
export const SCHEDULE_TRIGGERS = ['after_blade_change', 'after_relocation', 'after_failed_check'] as const;
export type ScheduleTrigger = (typeof SCHEDULE_TRIGGERS)[number];

export const SCHEDULE_TRIGGER_LABELS: Record<ScheduleTrigger, string> = {
  after_blade_change: 'After a blade change',
  after_relocation: 'After the machine is moved',
  after_failed_check: 'After any failed check',
};

/** How a scheduled check stands: not due, due within the next few days, due today, or past its due day. */
export const DUE_STATES = ['ok', 'soon', 'due', 'overdue'] as const;
export type DueState = (typeof DUE_STATES)[number];

export const DUE_STATE_LABELS: Record<DueState, string> = {
  ok: 'Not due',
  soon: 'Due soon',
  due: 'Due',
  overdue: 'Overdue',
};

/** One schedule of one machine, as an admin sets it. */
export const scheduleEntrySchema = z.object({
  procedureKey: z.string({ error: 'Choose a procedure.' }).trim().min(1, 'Choose a procedure.').max(60),
  intervalDays: z
    .number({ error: 'The interval is a whole number of days.' })
    .int('The interval is a whole number of days.')
    .min(1, 'The interval is at least 1 day.')
    .max(3650, 'The interval is at most 3650 days (ten years).')
    .nullable()
    .default(null),
  triggers: z
    .array(z.enum(SCHEDULE_TRIGGERS, { error: 'Choose triggers from the list.' }), { error: 'Choose triggers from the list.' })
    .max(SCHEDULE_TRIGGERS.length)
    .default([])
    .refine((t) => new Set(t).size === t.length, 'Name each trigger once.'),
  /** May be started while the machine is tagged out (to put right what failed). */
  allowedWhileTaggedOut: z.boolean({ error: 'Say yes or no.' }).default(false),
});
export type ScheduleEntry = z.infer<typeof scheduleEntrySchema>;

/** Every schedule of a machine at once: what is left out is no longer scheduled. */
export const machineSchedulesSchema = z
  .object({
    schedules: z.array(scheduleEntrySchema, { error: 'Send the list of schedules.' }).max(100),
  })
  .superRefine((body, ctx) => {
    const seen = new Set<string>();
    body.schedules.forEach((s, i) => {
      if (seen.has(s.procedureKey)) {
        ctx.addIssue({ code: 'custom', path: ['schedules', i, 'procedureKey'], message: 'This procedure is already in the list.' });
      }
      seen.add(s.procedureKey);
      if (s.intervalDays === null && s.triggers.length === 0 && !s.allowedWhileTaggedOut) {
        ctx.addIssue({ code: 'custom', path: ['schedules', i, 'intervalDays'], message: 'Give an interval in days, a trigger, or both.' });
      }
    });
  });
export type MachineSchedulesRequest = z.infer<typeof machineSchedulesSchema>;
export type MachineSchedulesInput = z.input<typeof machineSchedulesSchema>;

/** A schedule with its due date worked out. */
export interface ScheduleView {
  procedureKey: string;
  procedureTitle: string;
  intervalDays: number | null;
  triggers: ScheduleTrigger[];
  allowedWhileTaggedOut: boolean;
  /** The last signed, passing record of this procedure on this machine (when its work was finished). */
  lastPassedAt: string | null;
  lastPassedRecordId: string | null;
  /** When it falls due (or fell due); null when nothing makes it due. */
  dueAt: string | null;
  state: DueState;
  /** Why it is due, in plain words (empty when it is not). */
  reasons: string[];
}

/** One line of the due list. */
export interface DueItem extends ScheduleView {
  machine: { id: string; name: string; assetTag: string; location: string };
}

/** GET /api/schedules/due: checks due or overdue (and due soon), and machines tagged out. */
export interface DueList {
  at: string;
  items: DueItem[];
  taggedOut: {
    machine: { id: string; name: string; assetTag: string; location: string };
    recordId: string;
    procedureTitle: string;
    doneAt: string;
  }[];
}
