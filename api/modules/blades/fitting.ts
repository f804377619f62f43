import type { Procedure } from '../../../procedures/schema';
import {
  BLADE_MATERIALS,
  normalisePitch,
  roundLength,
  roundThickness,
  roundWidth,
  type BladeMaterial,
  type RemovalReason,
} from '../../contracts/blades';

/**
 * How a signed record says which blade went on: a step with these ids, as the bandsaw pack's
 * blade change has it ('new-blade': width, thickness, length, pitch, blade-type). Any procedure
 * with such a step records a fitting when it is signed off; others record nothing.
 */
export const NEW_BLADE_STEP = 'new-blade';
const NEW_BLADE_INPUTS = ['width', 'thickness', 'length', 'pitch', 'blade-type'] as const;

/** Where the same procedure asks what the old blade looked like ('inspect-old', input 'wear'). */
export const OLD_BLADE_STEP = 'inspect-old';

/** The old blade's wear, as the blade change reads it, is the reason it came off. */
const WEAR_REASONS: Record<string, RemovalReason> = {
  'even-wear': 'worn',
  'back-groove': 'worn',
  'one-side': 'worn',
  'teeth-stripped': 'stripped_teeth',
  'gullet-cracks': 'broken',
  other: 'other',
};

export interface EntryLike {
  stepId: string;
  attempt: number;
  values: Record<string, unknown>;
  createdAt: Date;
}

export interface NewBlade {
  widthMm: number;
  thicknessMm: number;
  lengthMm: number;
  /** Normalised ("6/10") when it reads as a pitch; otherwise as written. */
  pitch: string;
  material: BladeMaterial;
  /** When the new blade was recorded: the time it went on. */
  enteredAt: Date;
}

function latest(entries: readonly EntryLike[], stepId: string): EntryLike | undefined {
  return entries.filter((e) => e.stepId === stepId).sort((a, b) => b.attempt - a.attempt)[0];
}

/** The blade a record fitted, from the last attempt of its new-blade step; null when it records none. */
export function newBladeFrom(body: Procedure, entries: readonly EntryLike[]): NewBlade | null {
  const step = body.steps.find((s) => s.id === NEW_BLADE_STEP);
  if (!step || !NEW_BLADE_INPUTS.every((id) => step.inputs.some((i) => i.id === id))) return null;
  const entry = latest(entries, NEW_BLADE_STEP);
  if (!entry) return null;
  const v = entry.values;
  const [width, thickness, length, pitch, material] = NEW_BLADE_INPUTS.map((id) => v[id]);
  const positive = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x) && x > 0;
  if (!positive(width) || !positive(thickness) || !positive(length) || typeof pitch !== 'string') return null;
  if (!(BLADE_MATERIALS as readonly unknown[]).includes(material)) return null;
  const written = pitch.trim().slice(0, 20);
  return {
    widthMm: roundWidth(width),
    thicknessMm: roundThickness(thickness),
    lengthMm: roundLength(length),
    pitch: normalisePitch(written) ?? written,
    material: material as BladeMaterial,
    enteredAt: entry.createdAt,
  };
}

/** Why the old blade came off, from the record's reading of its wear; 'other' when it has none. */
export function removalFrom(body: Procedure, entries: readonly EntryLike[]): { reason: RemovalReason; note: string } {
  const step = body.steps.find((s) => s.id === OLD_BLADE_STEP);
  const entry = latest(entries, OLD_BLADE_STEP);
  const wear = entry?.values['wear'];
  const input = step?.inputs.find((i) => i.id === 'wear');
  if (!entry || typeof wear !== 'string' || input?.type !== 'choice') {
    return { reason: 'other', note: 'Replaced in a blade change.' };
  }
  const label = input.options.find((o) => o.value === wear)?.label ?? wear;
  const extra = typeof entry.values['wear-note'] === 'string' ? entry.values['wear-note'].trim() : '';
  return { reason: WEAR_REASONS[wear] ?? 'other', note: (extra ? `${label}. ${extra}` : label).slice(0, 500) };
}
