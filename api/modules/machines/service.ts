import canonicalize from 'canonicalize';
import { fn, col, where as sqlWhere, Op, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import type { CurrentBlade, MachineDetail, MachineListItem, MachineRequest } from '../../contracts/machines';
import type { MachineSchedulesRequest, ScheduleView } from '../../contracts/schedules';
import { AppError, type FieldProblem } from '../../lib/errors';
import { User } from '../people/model';
import type { Person } from '../people/repository';
import { Photo } from '../photos/model';
import { findPhoto, type PhotoRecord } from '../photos/repository';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord } from '../records/model';
import { MachineStatusService } from '../schedules/service';
import { Machine, MachineEvent, MachineSchedule } from './model';

const HISTORY_LIMIT = 50;

const unprocessable = (slug: string, title: string, detail: string, errors: FieldProblem[]) => new AppError(422, slug, title, detail, errors);

/** The machine register: workshop admins register and change machines and their schedules; everyone reads. */
export class MachineService {
  private bladeLookup: (machineId: string) => Promise<CurrentBlade | null> = async () => null;

  constructor(
    private readonly sequelize: Sequelize,
    private readonly status: MachineStatusService,
  ) {}

  /** The blades module fills the machine page's current blade through this; until then it is null. */
  useCurrentBlade(lookup: (machineId: string) => Promise<CurrentBlade | null>) {
    this.bladeLookup = lookup;
  }

  async list(): Promise<MachineListItem[]> {
    const rows = await Machine.findAll({ order: [['name', 'ASC']] });
    const derived = await this.status.derive(rows.map((m) => m.id));
    return rows.map((m) => ({ ...summary(m), status: MachineStatusService.statusOf(derived.get(m.id)!) }));
  }

  async detail(id: string): Promise<MachineDetail> {
    const m = await Machine.findByPk(id);
    if (!m) throw AppError.notFound('There is no machine with that id.');
    const [derived, history, moves, currentBlade] = await Promise.all([
      this.status.deriveOne(id),
      SetupRecord.findAll({
        where: { machineId: id, status: 'signed_off' },
        include: [
          { model: ProcedureVersion, as: 'procedureVersion', attributes: ['key', 'title'] },
          { model: User, as: 'startedBy', attributes: ['displayName'] },
        ],
        order: [['signedAt', 'DESC'], ['id', 'DESC']],
        limit: HISTORY_LIMIT,
      }),
      MachineEvent.findAll({ where: { machineId: id, kind: 'relocated' }, order: [['at', 'DESC']] }),
      this.bladeLookup(id),
    ]);
    const movers = await names(moves.map((e) => e.actorId));
    return {
      ...summary(m),
      status: MachineStatusService.statusOf(derived),
      currentBlade,
      schedules: derived.schedules,
      history: history.map((r) => ({
        recordId: r.id,
        procedureKey: r.procedureVersion!.key,
        procedureTitle: r.procedureVersion!.title,
        result: r.result,
        startedBy: r.startedBy?.displayName ?? '',
        doneAt: r.finishedAt ? r.finishedAt.toISOString() : null,
        signedAt: r.signedAt ? r.signedAt.toISOString() : null,
      })),
      moves: moves.map((e) => ({
        at: e.at.toISOString(),
        from: String(e.detail['from'] ?? ''),
        to: String(e.detail['to'] ?? ''),
        by: e.actorId ? (movers.get(e.actorId) ?? null) : null,
      })),
      startable: derived.startable,
    };
  }

  /** Register a machine; its registration is its arrival (a trigger for checks due after a move). */
  async create(person: Person, body: MachineRequest): Promise<MachineDetail> {
    const id = await this.guarded(async (transaction) => {
      await this.assertTagFree(body.assetTag, null, transaction);
      await this.assertPhoto(person, body.photoId, null, transaction);
      const m = await Machine.create(
        { name: body.name, assetTag: body.assetTag, location: body.location, kind: body.kind, model: body.model, spec: body.spec, photoId: body.photoId },
        { transaction },
      );
      await MachineEvent.create({ machineId: m.id, kind: 'registered', actorId: person.id, detail: { location: m.location, assetTag: m.assetTag } }, { transaction });
      return m.id;
    });
    return this.detail(id);
  }

  /** Change a machine. A new location is a move (checks set to follow a move fall due); the kind never changes. */
  async update(person: Person, id: string, body: MachineRequest): Promise<MachineDetail> {
    await this.guarded(async (transaction) => {
      const m = await Machine.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      if (!m) throw AppError.notFound('There is no machine with that id.');
      if (m.kind !== body.kind) {
        throw unprocessable('machine-kind-fixed', 'A machine’s kind cannot change', 'Its records and procedures are for its kind. Register a new machine instead.', [
          { pointer: '#/kind', detail: `This machine is a ${m.kind.replace(/_/g, ' ')}; its kind cannot change.` },
        ]);
      }
      await this.assertTagFree(body.assetTag, m.id, transaction);
      await this.assertPhoto(person, body.photoId, m.photoId, transaction);
      const changed: string[] = (['name', 'assetTag', 'model', 'photoId'] as const).filter((k) => (m[k] ?? null) !== body[k]);
      if (canonicalize(m.spec) !== canonicalize(body.spec)) changed.push('spec');
      const moved = m.location !== body.location;
      if (moved) {
        await MachineEvent.create({ machineId: m.id, kind: 'relocated', actorId: person.id, detail: { from: m.location, to: body.location } }, { transaction });
      }
      if (changed.length) {
        await MachineEvent.create({ machineId: m.id, kind: 'changed', actorId: person.id, detail: { fields: changed, before: pick(m, changed) } }, { transaction });
      }
      await m.update({ name: body.name, assetTag: body.assetTag, location: body.location, model: body.model, spec: body.spec, photoId: body.photoId }, { transaction });
    });
    return this.detail(id);
  }

  /** Replace a machine's schedules; every procedure named must be one written for its kind. */
  async setSchedules(id: string, body: MachineSchedulesRequest): Promise<ScheduleView[]> {
    await this.sequelize.transaction(async (transaction) => {
      const m = await Machine.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      if (!m) throw AppError.notFound('There is no machine with that id.');
      const keys = body.schedules.map((s) => s.procedureKey);
      const known = new Set(
        (await ProcedureVersion.findAll({ where: { key: { [Op.in]: keys.length ? keys : [''] }, machineKind: m.kind }, attributes: ['key'], transaction })).map((p) => p.key),
      );
      const unknown = body.schedules.flatMap((s, i) => (known.has(s.procedureKey) ? [] : [{ pointer: `#/schedules/${i}/procedureKey`, detail: `There is no procedure “${s.procedureKey}” for this kind of machine.` }]));
      if (unknown.length) throw unprocessable('unknown-procedure', 'No such procedure', 'Schedule only procedures written for this kind of machine.', unknown);
      await MachineSchedule.destroy({ where: { machineId: id, procedureKey: { [Op.notIn]: keys.length ? keys : [''] } }, transaction });
      for (const s of body.schedules) {
        const values = { intervalDays: s.intervalDays, triggers: s.triggers, allowedWhileTaggedOut: s.allowedWhileTaggedOut };
        const existing = await MachineSchedule.findOne({ where: { machineId: id, procedureKey: s.procedureKey }, transaction });
        if (existing) await existing.update(values, { transaction });
        else await MachineSchedule.create({ machineId: id, procedureKey: s.procedureKey, ...values }, { transaction });
      }
    });
    return (await this.status.deriveOne(id)).schedules;
  }

  /** The machine's photo, if it has one (shown to everyone signed in, unlike a person's own unattached photos). */
  async photo(id: string): Promise<PhotoRecord> {
    const m = await Machine.findByPk(id, { attributes: ['id', 'photoId'] });
    if (!m) throw AppError.notFound('There is no machine with that id.');
    const photo = m.photoId ? await findPhoto(m.photoId) : null;
    if (!photo) throw AppError.notFound('This machine has no photo.');
    return photo;
  }

  /** The machines to print labels for: those named, in the order named, or the whole register by name. */
  async forLabels(ids?: string[]): Promise<Machine[]> {
    if (!ids) return Machine.findAll({ order: [['name', 'ASC']] });
    const rows = await Machine.findAll({ where: { id: { [Op.in]: ids } } });
    const missing = ids.filter((id) => !rows.some((m) => m.id === id));
    if (missing.length) {
      throw unprocessable('unknown-machine', 'No such machine', 'Some of those machines are not in the register.', [
        { pointer: '#/query/ids', detail: `Not in the register: ${missing.join(', ')}.` },
      ]);
    }
    return ids.map((id) => rows.find((m) => m.id === id)!);
  }

  /** Run a register change in a transaction; a clash on the asset tag that slipped past the check is still a 409. */
  private async guarded<T>(work: (t: Transaction) => Promise<T>): Promise<T> {
    try {
      return await this.sequelize.transaction(work);
    } catch (err) {
      if (err instanceof UniqueConstraintError) throw tagTaken();
      throw err;
    }
  }

  private async assertTagFree(assetTag: string, self: string | null, transaction: Transaction) {
    const clash = await Machine.findOne({
      where: { [Op.and]: [sqlWhere(fn('lower', col('asset_tag')), assetTag.toLowerCase()), ...(self ? [{ id: { [Op.ne]: self } }] : [])] },
      transaction,
    });
    if (clash) throw tagTaken(clash.name);
  }

  /** A machine's photo is one the admin took, not evidence on a record (or the photo it has already). */
  private async assertPhoto(person: Person, photoId: string | null, current: string | null, transaction: Transaction) {
    if (!photoId || photoId === current) return;
    const photo = await Photo.findByPk(photoId, { transaction });
    const problem = (detail: string) => unprocessable('photo-not-usable', 'That photo cannot be used', detail, [{ pointer: '#/photoId', detail }]);
    if (!photo) throw problem('There is no photo with that id. Upload the photo first.');
    if (photo.ownerId !== person.id) throw problem('Use a photo you uploaded yourself.');
    if (photo.attachedRecordId) throw problem('That photo is evidence on a record. Take a new photo of the machine.');
  }
}

function summary(m: Machine) {
  return { id: m.id, name: m.name, assetTag: m.assetTag, location: m.location, kind: m.kind, model: m.model, spec: m.spec, photoId: m.photoId ?? null };
}

function tagTaken(name?: string) {
  return new AppError(409, 'asset-tag-taken', 'That asset tag is taken', name ? `${name} already has that asset tag.` : 'Another machine already has that asset tag.', [
    { pointer: '#/assetTag', detail: 'Another machine has this asset tag; each tag is used once.' },
  ]);
}

function pick(m: Machine, keys: string[]): Record<string, unknown> {
  return Object.fromEntries(keys.map((k) => [k, m.get(k as keyof Machine)]));
}

async function names(ids: (string | null)[]): Promise<Map<string, string>> {
  const wanted = [...new Set(ids.filter((x): x is string => !!x))];
  if (!wanted.length) return new Map();
  const users = await User.findAll({ where: { id: { [Op.in]: wanted } }, attributes: ['id', 'displayName'] });
  return new Map(users.map((u) => [u.id, u.displayName]));
}
