import { breakInRemaining, valueIn } from '../../../procedures/maths';
import {
  BLADE_MATERIAL_LABELS,
  REMOVAL_REASON_LABELS,
  type AreaView,
  type BladeTypeView,
  type BreakInView,
  type CutLogView,
  type FittingView,
  type RemovalReason,
} from '../../contracts/blades';
import type { User } from '../people/model';
import type { BladeCutLog, BladeFitting, BladeType } from './model';

const ref = (u: User | null | undefined) => (u ? { id: u.id, displayName: u.displayName } : null);
const figure = (n: number) => String(Math.round(n * 100) / 100);

/** An area (m²) in the units the workshop reads: cm² and in², through the maths library's units. */
export function areaView(m2: number): AreaView {
  const q = { value: m2, unit: 'm^2' };
  return { m2, cm2: valueIn(q, 'cm^2'), in2: valueIn(q, 'in^2') };
}

/** Break-in left for a blade that has cut this much, against the library's default break-in area. */
export function breakInView(areaCutM2: number): BreakInView {
  const r = breakInRemaining({ areaCut: { value: areaCutM2, unit: 'm^2' } });
  return {
    breakInArea: areaView(r.breakInArea.value),
    areaCut: areaView(r.areaCut.value),
    remaining: areaView(r.remaining.value),
    percentDone: r.percentDone,
    complete: r.complete,
    feedFraction: r.feedFraction,
  };
}

export function bladeLabel(t: Pick<BladeType, 'widthMm' | 'thicknessMm' | 'lengthMm' | 'pitch' | 'material'>): string {
  return `${figure(t.widthMm)} × ${figure(t.thicknessMm)} × ${figure(t.lengthMm)} mm · ${t.pitch} TPI · ${BLADE_MATERIAL_LABELS[t.material]}`;
}

export function typeView(t: BladeType, onSaws: number): BladeTypeView {
  return {
    id: t.id,
    widthMm: t.widthMm,
    thicknessMm: t.thicknessMm,
    lengthMm: t.lengthMm,
    pitch: t.pitch,
    material: t.material,
    stock: t.stock,
    listed: t.listed,
    note: t.note,
    label: bladeLabel(t),
    onSaws,
  };
}

export function fittingView(f: BladeFitting, cut: { areaM2: number; entries: number }, onSaws: number): FittingView {
  return {
    id: f.id,
    machineId: f.machineId,
    bladeType: typeView(f.bladeType!, onSaws),
    fittedAt: f.fittedAt.toISOString(),
    fittedBy: ref(f.fittedBy),
    recordId: f.recordId,
    fromStock: f.fromStock,
    removedAt: f.removedAt ? f.removedAt.toISOString() : null,
    removedBy: ref(f.removedBy),
    removalReason: f.removalReason as RemovalReason | null,
    removalReasonLabel: f.removalReason ? REMOVAL_REASON_LABELS[f.removalReason as RemovalReason] : null,
    removalNote: f.removalNote,
    removalRecordId: f.removalRecordId,
    cutEntries: cut.entries,
    breakIn: breakInView(cut.areaM2),
  };
}

export function cutLogView(c: BladeCutLog): CutLogView {
  return {
    id: c.id,
    shape: c.shape,
    unit: c.unit,
    sizes: c.sizes,
    count: c.count,
    area: areaView(c.areaM2),
    note: c.note,
    loggedBy: ref(c.loggedBy) ?? { id: c.loggedById, displayName: '' },
    loggedAt: c.loggedAt.toISOString(),
  };
}
