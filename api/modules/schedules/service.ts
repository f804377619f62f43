import { Op, QueryTypes, type Sequelize } from 'sequelize';
import { MACHINE_STATE_LABELS, type MachineStatus } from '../../contracts/machines';
import type { DueItem, DueList, ScheduleTrigger } from '../../contracts/schedules';
import { AppError } from '../../lib/errors';
import { Machine, MachineEvent, MachineSchedule } from '../machines/model';
import { User } from '../people/model';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord } from '../records/model';
import { deriveMachine, type DerivedMachine, type MachineFacts, type Placement, type SignedRun } from './derive';
import type { TagOutNotifier } from './tag-out-notice';

/** The procedure whose signed records count as blade changes (the bandsaw pack's key). */
export const BLADE_CHANGE_KEY = 'blade-change';

export interface StatusOptions {
  now: () => Date;
  soonDays: number;
  tagOutProcedures: readonly string[];
  timeZone: string;
  notify: TagOutNotifier;
  /** The app's own address, for links in notices. */
  publicUrl: string;
}

interface RunRow {
  record_id: string;
  machine_id: string;
  key: string;
  title: string;
  result: 'passed' | 'failed';
  done_at: Date;
  signed_at: Date;
}

const toRun = (r: RunRow): SignedRun => ({
  recordId: r.record_id,
  procedureKey: r.key,
  procedureTitle: r.title,
  result: r.result,
  doneAt: new Date(r.done_at),
  signedAt: new Date(r.signed_at),
});

/**
 * Machine status (Ready · Check due · Tagged out), due dates and tag-out, worked out from the signed
 * records, the register's moves and the schedules each time they are asked for.
 */
export class MachineStatusService {
  private readonly dateFormat: Intl.DateTimeFormat;

  constructor(
    private readonly sequelize: Sequelize,
    private readonly opts: StatusOptions,
  ) {
    this.dateFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: opts.timeZone });
  }

  now(): Date {
    return this.opts.now();
  }

  /**
   * Derive every machine named (or all of them). Only the signed records that can matter are read,
   * each found through an index rather than by scanning a machine's history: the latest pass of each
   * procedure; the failures no later pass has cleared (these tag a machine out); and, for each
   * schedule, the first failure and the first blade change after its procedure's latest pass (the
   * only ones that can set its due date).
   */
  async derive(machineIds?: string[]): Promise<Map<string, DerivedMachine>> {
    const machines = await Machine.findAll({ where: machineIds ? { id: { [Op.in]: machineIds } } : {}, attributes: ['id', 'createdAt', 'location'] });
    const ids = machines.map((m) => m.id);
    const out = new Map<string, DerivedMachine>();
    if (!ids.length) return out;
    const facts = new Map<string, MachineFacts>(ids.map((id) => [id, { lastPass: new Map(), failed: [], bladeChanges: [], placements: [], schedules: [] }]));

    // Each LATERAL below is one short range of the setup_records_signed_* indexes (migration 0011).
    const runs = await this.sequelize.query<RunRow & { kind: 'pass' | 'failure' | 'blade_change' }>(
      `WITH m AS (SELECT unnest($1::uuid[]) AS machine_id),
       v AS (SELECT id, key FROM procedure_versions),
       run AS NOT MATERIALIZED (
         SELECT r.id, r.machine_id, r.procedure_version_id, r.result, COALESCE(r.finished_at, r.signed_at) AS done_at, r.signed_at
           FROM setup_records r WHERE r.status = 'signed_off'
       ),
       last_pass AS (
         SELECT DISTINCT ON (m.machine_id, v.key) m.machine_id, v.key, lp.*
           FROM m CROSS JOIN v
           JOIN LATERAL (
             SELECT run.id, run.procedure_version_id, run.done_at, run.signed_at FROM run
              WHERE run.machine_id = m.machine_id AND run.procedure_version_id = v.id AND run.result = 'passed'
              ORDER BY run.done_at DESC, run.signed_at DESC LIMIT 1
           ) lp ON true
          ORDER BY m.machine_id, v.key, lp.done_at DESC, lp.signed_at DESC
       ),
       standing AS (
         SELECT f.* FROM m CROSS JOIN v
           LEFT JOIN last_pass lp ON lp.machine_id = m.machine_id AND lp.key = v.key
           JOIN LATERAL (
             SELECT run.* FROM run
              WHERE run.machine_id = m.machine_id AND run.procedure_version_id = v.id AND run.result = 'failed'
                AND run.done_at >= COALESCE(lp.done_at, '-infinity')
           ) f ON true
       ),
       since AS (
         SELECT s.machine_id, COALESCE(lp.done_at, '-infinity') AS after
           FROM machine_schedules s JOIN m ON m.machine_id = s.machine_id
           LEFT JOIN last_pass lp ON lp.machine_id = s.machine_id AND lp.key = s.procedure_key
       ),
       first_failure AS (
         SELECT ff.* FROM since JOIN LATERAL (
           SELECT run.* FROM run WHERE run.machine_id = since.machine_id AND run.result = 'failed' AND run.done_at > since.after
            ORDER BY run.done_at LIMIT 1
         ) ff ON true
       ),
       first_change AS (
         SELECT fc.* FROM since
           CROSS JOIN (SELECT id FROM v WHERE key = $2) bc
           CROSS JOIN (VALUES ('passed'::enum_setup_records_result), ('failed')) AS res(result)
           JOIN LATERAL (
             SELECT run.* FROM run
              WHERE run.machine_id = since.machine_id AND run.procedure_version_id = bc.id AND run.result = res.result AND run.done_at > since.after
              ORDER BY run.done_at LIMIT 1
           ) fc ON true
       ),
       picked AS (
         SELECT 'pass' AS kind, id, machine_id, procedure_version_id, done_at, signed_at, 'passed' AS result FROM last_pass
         UNION SELECT 'failure', id, machine_id, procedure_version_id, done_at, signed_at, 'failed' FROM standing
         UNION SELECT 'failure', id, machine_id, procedure_version_id, done_at, signed_at, 'failed' FROM first_failure
         UNION SELECT 'blade_change', id, machine_id, procedure_version_id, done_at, signed_at, result::text FROM first_change
       )
       SELECT p.kind, p.id AS record_id, p.machine_id, pv.key, pv.title, p.result, p.done_at, p.signed_at
         FROM picked p JOIN procedure_versions pv ON pv.id = p.procedure_version_id`,
      { bind: [ids, BLADE_CHANGE_KEY], type: QueryTypes.SELECT },
    );
    for (const row of runs) {
      const f = facts.get(row.machine_id)!;
      if (row.kind === 'pass') f.lastPass.set(row.key, toRun(row));
      else if (row.kind === 'failure') f.failed.push(toRun(row));
      else f.bladeChanges.push(toRun(row));
    }

    const moves = await MachineEvent.findAll({ where: { machineId: { [Op.in]: ids }, kind: { [Op.in]: ['registered', 'relocated'] } } });
    for (const e of moves) facts.get(e.machineId)!.placements.push(placementOf(e));
    for (const m of machines) {
      const f = facts.get(m.id)!;
      // Machines registered before the register kept events arrived when their row was made.
      if (!f.placements.some((p) => p.kind === 'registered')) f.placements.push({ at: m.createdAt, kind: 'registered', from: null, to: m.location });
    }

    const schedules = await MachineSchedule.findAll({ where: { machineId: { [Op.in]: ids } }, order: [['procedureKey', 'ASC']] });
    const titles = await this.titles(schedules.map((s) => s.procedureKey));
    for (const s of schedules) {
      facts.get(s.machineId)!.schedules.push({
        procedureKey: s.procedureKey,
        procedureTitle: titles.get(s.procedureKey) ?? s.procedureKey,
        intervalDays: s.intervalDays,
        triggers: s.triggers as ScheduleTrigger[],
        allowedWhileTaggedOut: s.allowedWhileTaggedOut,
      });
    }

    const options = { now: this.opts.now(), soonDays: this.opts.soonDays, tagOutProcedures: this.opts.tagOutProcedures, formatDate: (d: Date) => this.dateFormat.format(d) };
    for (const id of ids) out.set(id, deriveMachine(facts.get(id)!, options));
    return out;
  }

  async deriveOne(machineId: string): Promise<DerivedMachine> {
    const derived = (await this.derive([machineId])).get(machineId);
    if (!derived) throw AppError.notFound('There is no machine with that id.');
    return derived;
  }

  /** The status block the register shows for a machine. */
  static statusOf(d: DerivedMachine): MachineStatus {
    return {
      state: d.state,
      label: MACHINE_STATE_LABELS[d.state],
      taggedOutBy: d.taggedOutBy,
      dueCount: d.dueCount,
      nextDueAt: d.nextDueAt ? d.nextDueAt.toISOString() : null,
    };
  }

  /** Refuse to start a procedure on a tagged-out machine, unless it is one that may put it right. */
  async assertMayStart(machineId: string, procedureKey: string): Promise<void> {
    const d = await this.deriveOne(machineId);
    if (d.startable === 'all' || d.startable.includes(procedureKey)) return;
    const machine = (await Machine.findByPk(machineId))!;
    const cause = d.taggedOutBy[0]!;
    const titles = await this.titles(d.startable);
    const allowed = d.startable.map((k) => `“${titles.get(k) ?? k}”`).join(', ');
    throw new AppError(
      409,
      'machine-tagged-out',
      'This machine is tagged out',
      `${machine.name} is tagged out: “${cause.procedureTitle}” failed on ${this.dateFormat.format(new Date(cause.doneAt))}. Until a later “${cause.procedureTitle}” passes, only these may be started: ${allowed}.`,
      undefined,
      { taggedOutBy: d.taggedOutBy.map((c) => c.recordId), allowedProcedures: d.startable },
    );
  }

  /** Checks due, overdue and due soon across the register, soonest first, and the machines tagged out. */
  async dueList(): Promise<DueList> {
    const derived = await this.derive();
    const machines = new Map((await Machine.findAll({ attributes: ['id', 'name', 'assetTag', 'location'] })).map((m) => [m.id, m]));
    const ref = (id: string) => {
      const m = machines.get(id)!;
      return { id: m.id, name: m.name, assetTag: m.assetTag, location: m.location };
    };
    const items: DueItem[] = [];
    const taggedOut: DueList['taggedOut'] = [];
    for (const [id, d] of derived) {
      for (const s of d.schedules) if (s.state !== 'ok') items.push({ ...s, machine: ref(id) });
      const cause = d.taggedOutBy[0];
      if (cause) taggedOut.push({ machine: ref(id), recordId: cause.recordId, procedureTitle: cause.procedureTitle, doneAt: cause.doneAt });
    }
    items.sort((a, b) => Date.parse(a.dueAt!) - Date.parse(b.dueAt!) || a.machine.name.localeCompare(b.machine.name));
    taggedOut.sort((a, b) => a.machine.name.localeCompare(b.machine.name));
    return { at: this.opts.now().toISOString(), items, taggedOut };
  }

  /**
   * After a sign-off has committed: a failed record has just tagged its machine out (status is derived,
   * so it shows at once); tell the admins. Failures to notify are logged by the notifier, never thrown.
   */
  async afterSignOff(recordId: string): Promise<void> {
    const record = await SetupRecord.findByPk(recordId, {
      include: [
        { model: Machine, as: 'machine' },
        { model: ProcedureVersion, as: 'procedureVersion', attributes: { exclude: ['body'] } },
        { model: User, as: 'startedBy' },
      ],
    });
    if (!record || record.status !== 'signed_off' || record.result !== 'failed') return;
    const d = await this.deriveOne(record.machineId);
    if (d.state !== 'tagged_out') return;
    const m = record.machine!;
    await this.opts.notify({
      machine: { id: m.id, name: m.name, assetTag: m.assetTag, location: m.location },
      recordId: record.id,
      procedureTitle: record.procedureVersion!.title,
      performer: record.startedBy?.displayName ?? null,
      doneAt: (record.finishedAt ?? record.signedAt ?? new Date()).toISOString(),
      machineUrl: `${this.opts.publicUrl.replace(/\/$/, '')}/machines/${m.id}`,
      recordUrl: `${this.opts.publicUrl.replace(/\/$/, '')}/records/${record.id}`,
    });
  }

  /** The title of each procedure key: its approved version's, else its newest version's. */
  async titles(keys: string[]): Promise<Map<string, string>> {
    if (!keys.length) return new Map();
    const rows = await ProcedureVersion.findAll({ where: { key: { [Op.in]: [...new Set(keys)] } }, attributes: ['key', 'title', 'status', 'version'], order: [['version', 'ASC']] });
    const approved = new Map<string, string>();
    const newest = new Map<string, string>();
    for (const r of rows) {
      newest.set(r.key, r.title);
      if (r.status === 'approved') approved.set(r.key, r.title);
    }
    return new Map([...newest.keys()].map((k) => [k, approved.get(k) ?? newest.get(k)!]));
  }
}

function placementOf(e: MachineEvent): Placement {
  const d = e.detail as { from?: string; to?: string; location?: string };
  return e.kind === 'relocated'
    ? { at: e.at, kind: 'relocated', from: d.from ?? '', to: d.to ?? '' }
    : { at: e.at, kind: 'registered', from: null, to: d.location ?? '' };
}
