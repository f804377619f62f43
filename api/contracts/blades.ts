import { z } from 'zod';
import type { PersonRef } from './records';

/** Blade materials, with the same values the blade-change procedure's "Blade type" choice records. */
export const BLADE_MATERIALS = ['bi-metal', 'carbon'] as const;
export type BladeMaterial = (typeof BLADE_MATERIALS)[number];
export const BLADE_MATERIAL_LABELS: Record<BladeMaterial, string> = { 'bi-metal': 'Bi-metal', carbon: 'Carbon steel' };

/** Why a blade came off the saw. */
export const REMOVAL_REASONS = ['worn', 'broken', 'stripped_teeth', 'wrong_pitch', 'other'] as const;
export type RemovalReason = (typeof REMOVAL_REASONS)[number];
export const REMOVAL_REASON_LABELS: Record<RemovalReason, string> = {
  worn: 'Worn',
  broken: 'Broken or cracked',
  stripped_teeth: 'Stripped teeth',
  wrong_pitch: 'Wrong pitch for the job',
  other: 'Other',
};

/** The sections a cut can be logged for; the area comes from the workshop maths (`sectionArea`). */
export const CUT_SHAPES = ['round', 'rectangle', 'tube'] as const;
export type CutShape = (typeof CUT_SHAPES)[number];
export const CUT_SHAPE_LABELS: Record<CutShape, string> = { round: 'Round bar', rectangle: 'Flat, square or rectangle', tube: 'Round tube' };
export const CUT_UNITS = ['mm', 'in'] as const;
export type CutUnit = (typeof CUT_UNITS)[number];

export type Pitch = { kind: 'constant'; tpi: number } | { kind: 'variable'; coarse: number; fine: number };

const tpiText = (n: number) => String(Math.round(n * 100) / 100);

/**
 * A tooth pitch as marked on a blade, in teeth per inch: "6" for a constant pitch, "6/10" for a
 * variable one (coarsest first). Spaces, a "TPI" suffix and "6-10" are accepted; null when it is
 * not a pitch (common practice: variable pitches run from about 0.75/1.25 to 10/14 TPI).
 */
export function parsePitch(text: string): Pitch | null {
  const clean = text.trim().toLowerCase().replace(/\s*tpi$/, '').replace(/\s+/g, '').replace(/,/g, '.');
  const n = String.raw`(\d{1,2}(?:\.\d{1,2})?)`;
  const constant = new RegExp(`^${n}$`).exec(clean);
  const inRange = (x: number) => x >= 0.5 && x <= 32;
  if (constant) {
    const tpi = Number(constant[1]);
    return inRange(tpi) ? { kind: 'constant', tpi } : null;
  }
  const variable = new RegExp(`^${n}[/-]${n}$`).exec(clean);
  if (!variable) return null;
  const coarse = Number(variable[1]);
  const fine = Number(variable[2]);
  return inRange(coarse) && inRange(fine) && coarse < fine ? { kind: 'variable', coarse, fine } : null;
}

/** The pitch in one written form ("6", "6/10", "0.75/1.25"), or null when it is not a pitch. */
export function normalisePitch(text: string): string | null {
  const p = parsePitch(text);
  if (!p) return null;
  return p.kind === 'constant' ? tpiText(p.tpi) : `${tpiText(p.coarse)}/${tpiText(p.fine)}`;
}

/** Sizes are kept to the precision the blade-change procedure records: width 0.1 mm, thickness 0.01 mm, length 1 mm. */
export const roundWidth = (mm: number) => Math.round(mm * 10) / 10;
export const roundThickness = (mm: number) => Math.round(mm * 100) / 100;
export const roundLength = (mm: number) => Math.round(mm);

const size = (label: string, max: number) =>
  z
    .number({ error: `Enter the ${label} in mm.` })
    .finite()
    .positive(`The ${label} must be more than 0 mm.`)
    .max(max, `The ${label} cannot be more than ${max} mm.`);

const pitchField = z
  .string({ error: 'Enter the pitch in teeth per inch, such as 6 or 6/10.' })
  .trim()
  .min(1, 'Enter the pitch in teeth per inch, such as 6 or 6/10.')
  .max(20)
  .transform((text, ctx) => {
    const normal = normalisePitch(text);
    if (normal === null) {
      ctx.addIssue({ code: 'custom', message: 'Write the pitch as teeth per inch: one figure such as 6, or two such as 6/10 (coarser first), between 0.5 and 32.' });
      return z.NEVER;
    }
    return normal;
  });

const bladeTypeFields = {
  widthMm: size('width', 150).transform(roundWidth),
  thicknessMm: size('thickness', 3).transform(roundThickness),
  lengthMm: size('length', 30000).min(300, 'The length must be at least 300 mm.').transform(roundLength),
  pitch: pitchField,
  material: z.enum(BLADE_MATERIALS, { error: 'Choose bi-metal or carbon steel.' }),
  stock: z.number({ error: 'Enter how many are in stock.' }).int('Stock is a whole number of blades.').min(0, 'Stock cannot be below 0.').max(10000),
  note: z.string().trim().max(200, 'Keep the note under 200 characters.').nullable().optional(),
};

/** A new blade type for the stock list (workshop admins). */
export const bladeTypeSchema = z.object(bladeTypeFields);
export type BladeTypeRequest = z.infer<typeof bladeTypeSchema>;

/** A change to a blade type: any of its fields, and whether it is on the stock list. */
export const bladeTypeUpdateSchema = z
  .object({ ...bladeTypeFields, listed: z.boolean({ error: 'Say whether it is on the stock list.' }) })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Change at least one field.');
export type BladeTypeUpdate = z.infer<typeof bladeTypeUpdateSchema>;

/** Taking a blade off the saw outside a blade change (a snapped blade, the wrong pitch for a job…). */
export const removalSchema = z
  .object({
    reason: z.enum(REMOVAL_REASONS, { error: 'Choose why the blade came off.' }),
    note: z.string().trim().max(500, 'Keep the note under 500 characters.').optional(),
  })
  .superRefine((v, ctx) => {
    if (v.reason === 'other' && (v.note ?? '').length < 3) {
      ctx.addIssue({ code: 'custom', path: ['note'], message: 'Say why the blade came off.' });
    }
  });
export type RemovalRequest = z.infer<typeof removalSchema>;

const dimension = (label: string) =>
  z.number({ error: `Enter the ${label}.` }).finite().positive(`The ${label} must be more than 0.`).max(2000, `The ${label} is too large for a bandsaw.`);

/** Cuts made with the blade on the saw: the section, its size, and how many cuts. */
export const cutLogSchema = z
  .object({
    shape: z.enum(CUT_SHAPES, { error: 'Choose the shape of the section.' }),
    unit: z.enum(CUT_UNITS, { error: 'Sizes are in mm or in.' }),
    diameter: dimension('diameter').optional(),
    width: dimension('width').optional(),
    height: dimension('height').optional(),
    outside: dimension('outside diameter').optional(),
    wall: dimension('wall thickness').optional(),
    count: z.number({ error: 'Enter the number of cuts.' }).int('Cuts are a whole number.').min(1, 'At least one cut.').max(10000, 'Log at most 10,000 cuts at a time.'),
    note: z.string().trim().max(200, 'Keep the note under 200 characters.').optional(),
  })
  .superRefine((v, ctx) => {
    const need: Record<CutShape, readonly ('diameter' | 'width' | 'height' | 'outside' | 'wall')[]> = {
      round: ['diameter'],
      rectangle: ['width', 'height'],
      tube: ['outside', 'wall'],
    };
    for (const field of need[v.shape] ?? []) {
      if (v[field] === undefined) ctx.addIssue({ code: 'custom', path: [field], message: 'This size is needed for this shape.' });
    }
    if (v.shape === 'tube' && v.wall !== undefined && v.outside !== undefined && 2 * v.wall >= v.outside) {
      ctx.addIssue({ code: 'custom', path: ['wall'], message: 'The wall must be less than half the outside diameter.' });
    }
  });
export type CutLogRequest = z.infer<typeof cutLogSchema>;

/** An area in the units the workshop reads it in. */
export interface AreaView {
  m2: number;
  cm2: number;
  in2: number;
}

export interface BladeTypeView {
  id: string;
  widthMm: number;
  thicknessMm: number;
  lengthMm: number;
  pitch: string;
  material: BladeMaterial;
  stock: number;
  /** False for a blade that was fitted but is not on the stock list (added from a blade change). */
  listed: boolean;
  note: string | null;
  /** "27 × 0.9 × 2742 mm · 6/10 TPI · Bi-metal" */
  label: string;
  /** How many saws have one on now. */
  onSaws: number;
}

/** Break-in progress of a fitted blade (the workshop maths' `breakInRemaining`). */
export interface BreakInView {
  breakInArea: AreaView;
  areaCut: AreaView;
  remaining: AreaView;
  percentDone: number;
  complete: boolean;
  /** Feed as a fraction of normal: 0.5 while breaking in, then 1. */
  feedFraction: number;
}

/** One blade on one machine, from fitting to removal. */
export interface FittingView {
  id: string;
  machineId: string;
  bladeType: BladeTypeView;
  fittedAt: string;
  fittedBy: PersonRef | null;
  /** The signed blade-change record it was fitted in. */
  recordId: string | null;
  /** False when none of that type was in stock, so the count did not go down. */
  fromStock: boolean;
  removedAt: string | null;
  removedBy: PersonRef | null;
  removalReason: RemovalReason | null;
  removalReasonLabel: string | null;
  removalNote: string | null;
  /** The blade-change record that took it off, when it came off in one. */
  removalRecordId: string | null;
  cutEntries: number;
  breakIn: BreakInView;
}

export interface CutLogView {
  id: string;
  shape: CutShape;
  unit: CutUnit;
  sizes: Partial<Record<'diameter' | 'width' | 'height' | 'outside' | 'wall', number>>;
  count: number;
  area: AreaView;
  note: string | null;
  loggedBy: PersonRef;
  loggedAt: string;
}

export interface FittingDetail extends FittingView {
  cuts: CutLogView[];
}

/** A machine's blades: the one on now and every one before it, newest first. */
export interface MachineBlades {
  machine: { id: string; name: string; assetTag: string };
  current: FittingView | null;
  fittings: FittingView[];
}

/** The blade on each machine now, for the Blades page. */
export interface MachineCurrentBlade {
  machine: { id: string; name: string; assetTag: string; location: string };
  current: FittingView | null;
}
