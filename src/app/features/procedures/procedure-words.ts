import type { ProcedureStatus } from '@setwright/contracts/procedures';
import type { Bound, Caution, Limits, StepInput } from '@setwright/procedures/schema';

// Our words for the parts of a procedure, shared by the library, the read-only view and the editor.

export const STATUS_LABELS: Record<ProcedureStatus, string> = { draft: 'Draft', approved: 'Approved', retired: 'Retired' };

export const STEP_KIND_LABELS = {
  instruction: 'Instruction',
  isolation: 'Isolation',
  reading: 'Reading',
  check: 'Check',
  photo: 'Photo',
} as const;

export const INPUT_TYPE_LABELS: Record<StepInput['type'], string> = {
  number: 'Reading (a number)',
  choice: 'Choice of answers',
  yesno: 'Yes or no',
  text: 'Written note',
  photo: 'Photos',
};

export const CAUTION_LEVEL_LABELS: Record<Caution['level'], string> = {
  mandatory: 'Do this (blue)',
  warning: 'Warning (yellow)',
  prohibition: 'Do not (red)',
};

/** What each ISO 7010 sign our cautions may carry stands for, in our own words. */
export const SIGN_MEANINGS: Record<string, string> = {
  M002: 'Read the instructions',
  M004: 'Eye protection',
  M009: 'Gloves',
  M021: 'Isolate before work',
  W001: 'General warning',
  W012: 'Electricity',
  W018: 'Starts by itself',
  W019: 'Crushing',
  W022: 'Sharp edge or teeth',
  P010: 'Do not touch',
  P012: 'No heavy load',
};

export const MACHINE_KIND_LABELS: Record<string, string> = { horizontal_bandsaw: 'Horizontal bandsaw' };
export const machineKindLabel = (kind: string) => MACHINE_KIND_LABELS[kind] ?? kind.replace(/_/g, ' ');

function boundText(b: Bound, unit?: string): string {
  if (typeof b === 'number') return `${b}${unit ? ' ' + unit : ''}`;
  return `the machine’s ${b.$spec} (${b.unit})`;
}

/** Limits in words: "700 kgf to 900 kgf", "at least 2 mm", "at most the machine’s …". */
export function limitsText(limits: Limits | undefined, unit?: string): string {
  if (!limits) return '';
  const { min, max } = limits;
  if (min !== undefined && max !== undefined) return `${boundText(min, unit)} to ${boundText(max, unit)}`;
  if (min !== undefined) return `at least ${boundText(min, unit)}`;
  return `at most ${boundText(max!, unit)}`;
}

/** What counts as a pass for a field, in words; empty when anything passes or nothing is judged. */
export function passText(input: StepInput): string {
  switch (input.type) {
    case 'number':
      return input.limits ? `Within ${limitsText(input.limits, input.unit)}` : '';
    case 'choice':
      return input.pass?.length ? `Passes: ${input.options.filter((o) => input.pass!.includes(o.value)).map((o) => o.label).join('; ')}` : '';
    case 'yesno':
      return input.expected === undefined ? '' : `Passes when the answer is ${input.expected ? 'yes' : 'no'}`;
    default:
      return '';
  }
}
