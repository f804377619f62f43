import type { MachineState, TagOutCause } from '../../contracts/machines';
import type { DueState, ScheduleTrigger, ScheduleView } from '../../contracts/schedules';

const DAY_MS = 24 * 60 * 60 * 1000;

/** A signed record as status and due dates see it: when its work was finished, and how it came out. */
export interface SignedRun {
  recordId: string;
  procedureKey: string;
  procedureTitle: string;
  result: 'passed' | 'failed';
  /** When the work was finished at the machine (the time that orders records for status and due dates). */
  doneAt: Date;
  signedAt: Date;
}

/** The machine arriving (registered) or being moved through the register. */
export interface Placement {
  at: Date;
  kind: 'registered' | 'relocated';
  from: string | null;
  to: string;
}

export interface ScheduleRule {
  procedureKey: string;
  procedureTitle: string;
  intervalDays: number | null;
  triggers: ScheduleTrigger[];
  allowedWhileTaggedOut: boolean;
}

export interface MachineFacts {
  /** The latest signed, passing record of each procedure. */
  lastPass: Map<string, SignedRun>;
  /** Every signed, failed record. */
  failed: SignedRun[];
  /** Every signed blade-change record. */
  bladeChanges: SignedRun[];
  placements: Placement[];
  schedules: ScheduleRule[];
}

export interface DeriveOptions {
  now: Date;
  /** Checks falling due within this many days show as "Due soon". */
  soonDays: number;
  /** Procedure keys any tagged-out machine may still start (isolation, say). */
  tagOutProcedures: readonly string[];
  /** How dates are written in the reasons. */
  formatDate: (d: Date) => string;
}

export interface DerivedMachine {
  state: MachineState;
  taggedOutBy: TagOutCause[];
  schedules: ScheduleView[];
  startable: 'all' | string[];
  dueCount: number;
  nextDueAt: Date | null;
}

const byTime = (a: { at: Date }, b: { at: Date }) => a.at.getTime() - b.at.getTime();

/** How a due date stands now. */
export function dueState(dueAt: Date | null, now: Date, soonDays: number): DueState {
  if (!dueAt) return 'ok';
  const ahead = dueAt.getTime() - now.getTime();
  if (ahead > 0) return ahead <= soonDays * DAY_MS ? 'soon' : 'ok';
  return -ahead < DAY_MS ? 'due' : 'overdue';
}

/**
 * A machine's state from its signed records, moves and schedules. Nothing here is stored, so the
 * state cannot drift from the records:
 * - Tagged out while any signed, failed record has no later signed, passing record of the same procedure.
 * - A schedule falls due at its last pass plus its interval (at registration when it never passed), or
 *   at the first triggering event after its last pass (a blade change, a move, any failed check).
 * - Check due when any schedule is due or overdue; otherwise Ready.
 */
export function deriveMachine(facts: MachineFacts, opts: DeriveOptions): DerivedMachine {
  const { now, formatDate } = opts;
  const faults = facts.failed
    .filter((f) => {
      const pass = facts.lastPass.get(f.procedureKey);
      return !pass || pass.doneAt.getTime() <= f.doneAt.getTime();
    })
    .sort((a, b) => b.doneAt.getTime() - a.doneAt.getTime());

  const placements = [...facts.placements].sort(byTime);
  const arrived = placements[0]?.at ?? null;

  const schedules: ScheduleView[] = facts.schedules.map((s) => {
    const pass = facts.lastPass.get(s.procedureKey) ?? null;
    const since = pass?.doneAt.getTime() ?? -Infinity;
    const candidates: { at: Date; reason: string }[] = [];
    if (s.intervalDays !== null) {
      if (pass) {
        candidates.push({
          at: new Date(pass.doneAt.getTime() + s.intervalDays * DAY_MS),
          reason: `Every ${s.intervalDays} day${s.intervalDays === 1 ? '' : 's'}: last passed ${formatDate(pass.doneAt)}.`,
        });
      } else if (arrived) {
        candidates.push({ at: arrived, reason: `Every ${s.intervalDays} day${s.intervalDays === 1 ? '' : 's'}: never passed on this machine.` });
      }
    }
    if (s.triggers.includes('after_blade_change')) {
      const change = facts.bladeChanges.filter((r) => r.doneAt.getTime() > since).sort((a, b) => a.doneAt.getTime() - b.doneAt.getTime())[0];
      if (change) candidates.push({ at: change.doneAt, reason: `The blade was changed ${formatDate(change.doneAt)}, after its last pass.` });
    }
    if (s.triggers.includes('after_relocation')) {
      const move = placements.find((p) => p.at.getTime() > since);
      if (move) {
        candidates.push({
          at: move.at,
          reason:
            move.kind === 'relocated'
              ? `Moved from “${move.from}” to “${move.to}” ${formatDate(move.at)}${pass ? ', after its last pass' : ''}.`
              : `Registered at “${move.to}” ${formatDate(move.at)}; never passed since.`,
        });
      }
    }
    if (s.triggers.includes('after_failed_check')) {
      const failure = facts.failed.filter((r) => r.doneAt.getTime() > since).sort((a, b) => a.doneAt.getTime() - b.doneAt.getTime())[0];
      if (failure) candidates.push({ at: failure.doneAt, reason: `“${failure.procedureTitle}” failed ${formatDate(failure.doneAt)}, after its last pass.` });
    }
    candidates.sort(byTime);
    const dueAt = candidates[0]?.at ?? null;
    const state = dueState(dueAt, now, opts.soonDays);
    const horizon = now.getTime() + opts.soonDays * DAY_MS;
    return {
      procedureKey: s.procedureKey,
      procedureTitle: s.procedureTitle,
      intervalDays: s.intervalDays,
      triggers: s.triggers,
      allowedWhileTaggedOut: s.allowedWhileTaggedOut,
      lastPassedAt: pass ? pass.doneAt.toISOString() : null,
      lastPassedRecordId: pass?.recordId ?? null,
      dueAt: dueAt ? dueAt.toISOString() : null,
      state,
      reasons: state === 'ok' ? [] : candidates.filter((c) => c.at.getTime() <= horizon).map((c) => c.reason),
    };
  });

  const due = schedules.filter((s) => s.state === 'due' || s.state === 'overdue');
  const dueTimes = schedules.flatMap((s) => (s.dueAt ? [Date.parse(s.dueAt)] : []));
  const startable = faults.length
    ? [...new Set([...faults.map((f) => f.procedureKey), ...opts.tagOutProcedures, ...facts.schedules.filter((s) => s.allowedWhileTaggedOut).map((s) => s.procedureKey)])]
    : ('all' as const);
  return {
    state: faults.length ? 'tagged_out' : due.length ? 'check_due' : 'ready',
    taggedOutBy: faults.map((f) => ({
      recordId: f.recordId,
      procedureKey: f.procedureKey,
      procedureTitle: f.procedureTitle,
      doneAt: f.doneAt.toISOString(),
      signedAt: f.signedAt.toISOString(),
    })),
    schedules,
    startable,
    dueCount: due.length,
    nextDueAt: dueTimes.length ? new Date(Math.min(...dueTimes)) : null,
  };
}
