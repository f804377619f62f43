import { fn, col, literal, Op, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import type { Logger } from 'pino';
import { totalCutArea, type CutSection } from '../../../procedures/maths';
import type {
  BladeTypeRequest,
  BladeTypeUpdate,
  BladeTypeView,
  CutLogRequest,
  CutLogView,
  FittingDetail,
  FittingView,
  MachineBlades,
  MachineCurrentBlade,
  RemovalRequest,
} from '../../contracts/blades';
import { AppError } from '../../lib/errors';
import { Machine } from '../machines/model';
import { User } from '../people/model';
import type { Person } from '../people/repository';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord, StepEntry } from '../records/model';
import { newBladeFrom, NEW_BLADE_STEP, OLD_BLADE_STEP, removalFrom, type NewBlade } from './fitting';
import { BladeCutLog, BladeFitting, BladeType } from './model';
import { cutLogView, fittingView, typeView } from './views';

const fittingParts = {
  include: [
    { model: BladeType, as: 'bladeType' },
    { model: User, as: 'fittedBy' },
    { model: User, as: 'removedBy' },
  ],
};

const SIZES_BY_SHAPE = { round: ['diameter'], rectangle: ['width', 'height'], tube: ['outside', 'wall'] } as const;

/** How many saws have a blade of each type on now. */
async function onSawsByType(typeIds: string[], transaction?: Transaction): Promise<Map<string, number>> {
  if (!typeIds.length) return new Map();
  const rows = (await BladeFitting.findAll({
    attributes: ['bladeTypeId', [fn('COUNT', col('id')), 'n']],
    where: { bladeTypeId: { [Op.in]: [...new Set(typeIds)] }, removedAt: null },
    group: ['bladeTypeId'],
    raw: true,
    transaction,
  })) as unknown as { bladeTypeId: string; n: string }[];
  return new Map(rows.map((r) => [r.bladeTypeId, Number(r.n)]));
}

/** Area cut and number of cut entries for each fitting. */
async function cutsByFitting(fittingIds: string[]): Promise<Map<string, { areaM2: number; entries: number }>> {
  if (!fittingIds.length) return new Map();
  const rows = (await BladeCutLog.findAll({
    attributes: ['fittingId', [fn('SUM', col('area_m2')), 'area'], [fn('COUNT', col('id')), 'n']],
    where: { fittingId: { [Op.in]: fittingIds } },
    group: ['fittingId'],
    raw: true,
  })) as unknown as { fittingId: string; area: string | number; n: string }[];
  return new Map(rows.map((r) => [r.fittingId, { areaM2: Number(r.area), entries: Number(r.n) }]));
}

async function fittingViews(rows: BladeFitting[]): Promise<FittingView[]> {
  const [cuts, onSaws] = await Promise.all([cutsByFitting(rows.map((f) => f.id)), onSawsByType(rows.map((f) => f.bladeTypeId))]);
  return rows.map((f) => fittingView(f, cuts.get(f.id) ?? { areaM2: 0, entries: 0 }, onSaws.get(f.bladeTypeId) ?? 0));
}

/** The blade on a machine now, with its break-in progress; null when none is recorded. For the machine page. */
export async function currentBlade(machineId: string): Promise<FittingView | null> {
  const row = await BladeFitting.findOne({ where: { machineId, removedAt: null }, ...fittingParts });
  return row ? (await fittingViews([row]))[0]! : null;
}

const duplicateType = () =>
  new AppError(409, 'blade-type-exists', 'This blade type is already on the list', 'A blade type with this width, thickness, length, pitch and material is already on the list. Change its stock instead.', [
    { pointer: '#/pitch', detail: 'The same size, pitch and material is already on the list.' },
  ]);

/** Blade types and stock, the blades fitted to each machine, their removal, and the cuts they make. */
export class BladeService {
  constructor(
    private readonly sequelize: Sequelize,
    private readonly logger: Logger,
  ) {}

  async listTypes(): Promise<BladeTypeView[]> {
    const rows = await BladeType.findAll({
      order: [['listed', 'DESC'], ['widthMm', 'ASC'], ['lengthMm', 'ASC'], ['thicknessMm', 'ASC'], ['pitch', 'ASC'], ['material', 'ASC']],
    });
    const onSaws = await onSawsByType(rows.map((t) => t.id));
    return rows.map((t) => typeView(t, onSaws.get(t.id) ?? 0));
  }

  /**
   * Put a blade type on the stock list. If the same blade was already seen fitted (an unlisted type
   * made from a blade change), that type is listed with this stock rather than added twice.
   */
  async createType(req: BladeTypeRequest): Promise<{ type: BladeTypeView; created: boolean }> {
    const { widthMm, thicknessMm, lengthMm, pitch, material } = req;
    const existing = await BladeType.findOne({ where: { widthMm, thicknessMm, lengthMm, pitch, material } });
    if (existing?.listed) throw duplicateType();
    if (existing) {
      await existing.update({ listed: true, stock: req.stock, note: req.note ?? existing.note });
      return { type: await this.type(existing.id), created: false };
    }
    try {
      const row = await BladeType.create({ widthMm, thicknessMm, lengthMm, pitch, material, stock: req.stock, listed: true, note: req.note ?? null });
      return { type: await this.type(row.id), created: true };
    } catch (err) {
      if (err instanceof UniqueConstraintError) throw duplicateType();
      throw err;
    }
  }

  async updateType(id: string, req: BladeTypeUpdate): Promise<BladeTypeView> {
    const row = await BladeType.findByPk(id);
    if (!row) throw AppError.notFound('There is no blade type with that id.');
    try {
      await row.update(req);
    } catch (err) {
      if (err instanceof UniqueConstraintError) throw duplicateType();
      throw err;
    }
    return this.type(id);
  }

  async type(id: string): Promise<BladeTypeView> {
    const row = await BladeType.findByPk(id);
    if (!row) throw AppError.notFound('There is no blade type with that id.');
    return typeView(row, (await onSawsByType([id])).get(id) ?? 0);
  }

  /** Every machine with the blade on it now. */
  async onEachMachine(): Promise<MachineCurrentBlade[]> {
    const [machines, current] = await Promise.all([
      Machine.findAll({ order: [['name', 'ASC']] }),
      BladeFitting.findAll({ where: { removedAt: null }, ...fittingParts }),
    ]);
    const views = new Map((await fittingViews(current)).map((v) => [v.machineId, v]));
    return machines.map((m) => ({ machine: { id: m.id, name: m.name, assetTag: m.assetTag, location: m.location }, current: views.get(m.id) ?? null }));
  }

  /** A machine's blade history, newest first, with the one on now. */
  async machineBlades(machineId: string): Promise<MachineBlades> {
    const machine = await Machine.findByPk(machineId);
    if (!machine) throw AppError.notFound('There is no machine with that id.');
    const rows = await BladeFitting.findAll({ where: { machineId }, ...fittingParts, order: [['fittedAt', 'DESC'], ['createdAt', 'DESC']] });
    const fittings = await fittingViews(rows);
    return {
      machine: { id: machine.id, name: machine.name, assetTag: machine.assetTag },
      current: fittings.find((f) => f.removedAt === null) ?? null,
      fittings,
    };
  }

  async fitting(id: string): Promise<FittingDetail> {
    const row = await BladeFitting.findByPk(id, fittingParts);
    if (!row) throw AppError.notFound('There is no blade fitting with that id.');
    const cuts = await BladeCutLog.findAll({ where: { fittingId: id }, include: [{ model: User, as: 'loggedBy' }], order: [['loggedAt', 'DESC']] });
    return { ...(await fittingViews([row]))[0]!, cuts: cuts.map(cutLogView) };
  }

  /** Take the blade off outside a blade change (it snapped, or the pitch is wrong for the job), with the reason. */
  async remove(person: Person, fittingId: string, req: RemovalRequest): Promise<FittingDetail> {
    await this.sequelize.transaction(async (transaction) => {
      const row = await BladeFitting.findByPk(fittingId, { transaction, lock: transaction.LOCK.UPDATE });
      if (!row) throw AppError.notFound('There is no blade fitting with that id.');
      if (row.removedAt) throw AppError.conflict('This blade has already been taken off.');
      await row.update({ removedAt: new Date(), removedById: person.id, removalReason: req.reason, removalNote: req.note || null, removalRecordId: null }, { transaction });
    });
    return this.fitting(fittingId);
  }

  /** Log cuts made with the blade on the saw; the area is the workshop maths' `totalCutArea`. */
  async logCuts(person: Person, fittingId: string, req: CutLogRequest): Promise<CutLogView> {
    const fitting = await BladeFitting.findByPk(fittingId);
    if (!fitting) throw AppError.notFound('There is no blade fitting with that id.');
    if (fitting.removedAt) throw AppError.conflict('This blade has been taken off. Log cuts against the blade on the saw now.');
    const sizes: Record<string, number> = {};
    for (const field of SIZES_BY_SHAPE[req.shape]) sizes[field] = req[field]!;
    const q = (field: string) => ({ value: sizes[field]!, unit: req.unit });
    const section: CutSection =
      req.shape === 'round'
        ? { shape: 'round', diameter: q('diameter') }
        : req.shape === 'rectangle'
          ? { shape: 'rectangle', width: q('width'), height: q('height') }
          : { shape: 'tube', outside: q('outside'), wall: q('wall') };
    const area = totalCutArea({ cuts: [{ section, count: req.count }] });
    const row = await BladeCutLog.create({
      fittingId,
      shape: req.shape,
      unit: req.unit,
      sizes,
      count: req.count,
      areaM2: area.value,
      note: req.note || null,
      loggedById: person.id,
      loggedAt: new Date(),
    });
    return cutLogView((await BladeCutLog.findByPk(row.id, { include: [{ model: User, as: 'loggedBy' }] }))!);
  }

  /**
   * Called by sign-off once a record is committed: a signed blade change records the blade it fitted.
   * A failure here is logged and never undoes or fails the signature; running it again is harmless.
   */
  async recordFittingAfterSignOff(recordId: string): Promise<void> {
    try {
      await this.fitFromSignedRecord(recordId);
    } catch (err) {
      this.logger.error({ err, recordId }, 'the blade fitted in a signed record could not be recorded');
    }
  }

  /**
   * The fitting a signed record made, matched to a blade type by size, pitch and material (or added as
   * an unlisted type), one taken from stock; the blade it replaced is taken off with the reason the
   * record's wear reading gives. Returns the fitting's id, or null when the record fits no blade.
   */
  async fitFromSignedRecord(recordId: string): Promise<string | null> {
    const record = await SetupRecord.findByPk(recordId, { include: [{ model: ProcedureVersion, as: 'procedureVersion' }] });
    if (!record || record.status !== 'signed_off') return null;
    const body = record.procedureVersion!.body;
    const entries = await StepEntry.findAll({ where: { recordId, stepId: { [Op.in]: [NEW_BLADE_STEP, OLD_BLADE_STEP] } } });
    const blade = newBladeFrom(body, entries);
    if (!blade) return null;
    return this.sequelize.transaction(async (transaction) => {
      // One fitting at a time per machine, so the blade history never has two blades on at once.
      await this.sequelize.query('SELECT pg_advisory_xact_lock(hashtext(:key))', { replacements: { key: `blades:${record.machineId}` }, transaction });
      const already = await BladeFitting.findOne({ where: { recordId }, transaction });
      if (already) return already.id;
      const type = await this.matchOrAdd(blade, recordId, transaction);
      const [taken] = await BladeType.update({ stock: literal('stock - 1') as unknown as number }, { where: { id: type.id, stock: { [Op.gt]: 0 } }, transaction });
      const fittedAt = blade.enteredAt;
      const later = await BladeFitting.findOne({ where: { machineId: record.machineId, fittedAt: { [Op.gt]: fittedAt } }, order: [['fittedAt', 'ASC']], transaction });
      const base = { machineId: record.machineId, bladeTypeId: type.id, recordId, fittedAt, fittedById: record.startedById, fromStock: taken > 0 };
      if (later) {
        // Signed after a later blade change: it is history already, taken off when that one went on.
        const row = await BladeFitting.create(
          { ...base, removedAt: later.fittedAt, removedById: null, removalReason: 'other', removalNote: 'Replaced by a later blade change that was signed off first.', removalRecordId: later.recordId },
          { transaction },
        );
        return row.id;
      }
      const previous = await BladeFitting.findOne({ where: { machineId: record.machineId, removedAt: null }, transaction, lock: transaction.LOCK.UPDATE });
      if (previous) {
        const { reason, note } = removalFrom(body, entries);
        await previous.update({ removedAt: fittedAt, removedById: record.startedById, removalReason: reason, removalNote: note, removalRecordId: recordId }, { transaction });
      }
      const row = await BladeFitting.create(base, { transaction });
      return row.id;
    });
  }

  /** The blade type with exactly this size, pitch and material; a new unlisted one when there is none. */
  private async matchOrAdd(blade: NewBlade, recordId: string, transaction: Transaction): Promise<BladeType> {
    const { widthMm, thicknessMm, lengthMm, pitch, material } = blade;
    const where = { widthMm, thicknessMm, lengthMm, pitch, material };
    const found = await BladeType.findOne({ where, transaction, lock: transaction.LOCK.UPDATE });
    if (found) return found;
    const [row] = await BladeType.findOrCreate({
      where,
      defaults: { ...where, stock: 0, listed: false, note: `First seen fitted in record ${recordId.slice(0, 8)}; not on the stock list.` },
      transaction,
    });
    return row;
  }
}
