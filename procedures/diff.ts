import type { Procedure, Step } from './schema';

// A step-by-step difference between two versions of a procedure, for the person approving a
// draft. Pure, so the server's diff route and the draft editor (live, without a round trip) give
// the same answer. Steps, fields and worked-out values are matched by their ids.

/** The top-level fields of a procedure that can differ between versions (the version number always does). */
export const PROCEDURE_FIELDS = ['title', 'intendedUse', 'scope', 'machineKind', 'hazards', 'ppe'] as const;
export type ProcedureField = (typeof PROCEDURE_FIELDS)[number];

/** The parts of a step a difference names. */
export const STEP_FIELDS = ['title', 'instruction', 'kind', 'powered', 'cautions', 'inputs', 'computed'] as const;
export type StepField = (typeof STEP_FIELDS)[number];

export type ItemChange = 'added' | 'removed' | 'changed' | 'moved';

/** A field to fill in, or a worked-out value, that differs. `fields` names what changed in it (for 'changed'). */
export interface ItemDiff {
  id: string;
  label: string;
  change: ItemChange;
  /** Its order among the items both versions share changed (a 'changed' item may also have moved). */
  moved: boolean;
  fields: string[];
}

export type StepChange = 'added' | 'removed' | 'changed' | 'moved' | 'unchanged';

export interface StepDiff {
  id: string;
  /** The step's title in the newer version (in the older one, for a removed step). */
  title: string;
  change: StepChange;
  /** Its order among the steps both versions share changed (a 'changed' step may also have moved). */
  moved: boolean;
  /** Position in the newer version (0-based); null for a removed step. */
  index: number | null;
  /** Position in the older version (0-based); null for an added step. */
  previousIndex: number | null;
  /** What changed in the step; empty unless change is 'changed'. */
  fields: StepField[];
  inputs: ItemDiff[];
  computed: ItemDiff[];
  /** Cautions only the newer / only the older version has (by their whole content). */
  cautionsAdded: Step['cautions'];
  cautionsRemoved: Step['cautions'];
  /** The step in each version, for a side-by-side view. */
  before: Step | null;
  after: Step | null;
}

export interface ProcedureDiff {
  from: { key: string; version: number };
  to: { key: string; version: number };
  /** Top-level fields that changed. */
  fields: ProcedureField[];
  /** Every step of both versions: the newer order, with each removed step placed after the step it followed. */
  steps: StepDiff[];
  /** Counts, for a one-line summary. */
  summary: { added: number; removed: number; changed: number; moved: number; unchanged: number };
  /** Nothing but the version number differs. */
  same: boolean;
}

/** JSON with object keys sorted, so equal content compares equal whatever its key order. */
function stable(value: unknown): string {
  if (value === undefined) return 'undefined';
  if (value === null || typeof value !== 'object') return JSON.stringify(value);
  if (Array.isArray(value)) return `[${value.map(stable).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${stable(v)}`).join(',')}}`;
}

/** Deep equality of JSON-like values (an absent key equals an undefined one). */
export function sameContent(a: unknown, b: unknown): boolean {
  return stable(a) === stable(b);
}

/**
 * The ids, among those both lists share, that keep their relative order (a longest common
 * subsequence); the rest of the shared ids have moved.
 */
function keptInOrder(before: string[], after: string[]): Set<string> {
  const inAfter = new Set(after);
  const inBefore = new Set(before);
  const a = before.filter((id) => inAfter.has(id));
  const b = after.filter((id) => inBefore.has(id));
  const n = a.length;
  const m = b.length;
  const table: number[][] = Array.from({ length: n + 1 }, () => new Array<number>(m + 1).fill(0));
  for (let i = n - 1; i >= 0; i--) {
    for (let j = m - 1; j >= 0; j--) {
      table[i]![j] = a[i] === b[j] ? table[i + 1]![j + 1]! + 1 : Math.max(table[i + 1]![j]!, table[i]![j + 1]!);
    }
  }
  const kept = new Set<string>();
  let i = 0;
  let j = 0;
  while (i < n && j < m) {
    if (a[i] === b[j]) {
      kept.add(a[i]!);
      i++;
      j++;
    } else if (table[i + 1]![j]! >= table[i]![j + 1]!) {
      i++;
    } else {
      j++;
    }
  }
  return kept;
}

/** Names of the keys whose values differ between two objects (in a stable order: the newer object's keys first). */
function changedKeys(before: object, after: object): string[] {
  const b = before as Record<string, unknown>;
  const a = after as Record<string, unknown>;
  const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])];
  return keys.filter((k) => !sameContent(b[k], a[k]));
}

interface Item {
  id: string;
  label: string;
}

function diffItems<T extends Item>(before: readonly T[], after: readonly T[]): ItemDiff[] {
  const old = new Map(before.map((x) => [x.id, x]));
  const now = new Map(after.map((x) => [x.id, x]));
  const kept = keptInOrder(before.map((x) => x.id), after.map((x) => x.id));
  const out: ItemDiff[] = [];
  for (const item of after) {
    const was = old.get(item.id);
    if (!was) {
      out.push({ id: item.id, label: item.label, change: 'added', moved: false, fields: [] });
      continue;
    }
    const fields = changedKeys(was, item);
    const moved = !kept.has(item.id);
    if (fields.length) out.push({ id: item.id, label: item.label, change: 'changed', moved, fields });
    else if (moved) out.push({ id: item.id, label: item.label, change: 'moved', moved, fields: [] });
  }
  for (const item of before) {
    if (!now.has(item.id)) out.push({ id: item.id, label: item.label, change: 'removed', moved: false, fields: [] });
  }
  return out;
}

/** Cautions in `a` that `b` lacks, counting repeats. */
function cautionsOnlyIn(a: Step['cautions'], b: Step['cautions']): Step['cautions'] {
  const pool = b.map(stable);
  return a.filter((c) => {
    const k = pool.indexOf(stable(c));
    if (k === -1) return true;
    pool.splice(k, 1);
    return false;
  });
}

function diffStep(before: Step, after: Step, moved: boolean, index: number, previousIndex: number): StepDiff {
  const inputs = diffItems(before.inputs, after.inputs);
  const computed = diffItems(before.computed, after.computed);
  const fields = STEP_FIELDS.filter((f) => {
    if (f === 'inputs') return inputs.length > 0;
    if (f === 'computed') return computed.length > 0;
    return !sameContent(before[f], after[f]);
  });
  const extra = changedKeys(before, after).filter((k) => !(STEP_FIELDS as readonly string[]).includes(k));
  const changed = fields.length > 0 || extra.length > 0;
  return {
    id: after.id,
    title: after.title,
    change: changed ? 'changed' : moved ? 'moved' : 'unchanged',
    moved,
    index,
    previousIndex,
    fields,
    inputs,
    computed,
    cautionsAdded: cautionsOnlyIn(after.cautions, before.cautions),
    cautionsRemoved: cautionsOnlyIn(before.cautions, after.cautions),
    before,
    after,
  };
}

function blank(step: Step, change: 'added' | 'removed', index: number): StepDiff {
  return {
    id: step.id,
    title: step.title,
    change,
    moved: false,
    index: change === 'added' ? index : null,
    previousIndex: change === 'removed' ? index : null,
    fields: [],
    inputs: [],
    computed: [],
    cautionsAdded: [],
    cautionsRemoved: [],
    before: change === 'removed' ? step : null,
    after: change === 'added' ? step : null,
  };
}

/** How `to` differs from `from` (usually: a draft against the approved version), step by step. */
export function diffProcedures(from: Procedure, to: Procedure): ProcedureDiff {
  const fields = PROCEDURE_FIELDS.filter((f) => !sameContent(from[f], to[f]));
  const oldIndex = new Map(from.steps.map((s, i) => [s.id, i]));
  const newIds = new Set(to.steps.map((s) => s.id));
  const kept = keptInOrder(from.steps.map((s) => s.id), to.steps.map((s) => s.id));

  const steps: StepDiff[] = to.steps.map((step, i) => {
    const was = oldIndex.get(step.id);
    return was === undefined ? blank(step, 'added', i) : diffStep(from.steps[was]!, step, !kept.has(step.id), i, was);
  });
  // Put each removed step after the nearest earlier step (of the older version) that is still there.
  from.steps.forEach((step, i) => {
    if (newIds.has(step.id)) return;
    let at = 0;
    for (let k = i - 1; k >= 0; k--) {
      const anchor = steps.findIndex((d) => d.id === from.steps[k]!.id && d.change !== 'removed');
      if (anchor !== -1) {
        at = anchor + 1;
        break;
      }
    }
    while (at < steps.length && steps[at]!.change === 'removed') at++;
    steps.splice(at, 0, blank(step, 'removed', i));
  });

  const count = (c: StepChange) => steps.filter((s) => s.change === c).length;
  const summary = { added: count('added'), removed: count('removed'), changed: count('changed'), moved: count('moved'), unchanged: count('unchanged') };
  return {
    from: { key: from.key, version: from.version },
    to: { key: to.key, version: to.version },
    fields,
    steps,
    summary,
    same: fields.length === 0 && steps.every((s) => s.change === 'unchanged'),
  };
}

/** Plain words for the parts a difference names, shared by every screen that shows one. */
export const DIFF_FIELD_LABELS: Record<string, string> = {
  title: 'title',
  intendedUse: 'intended use',
  scope: 'scope',
  machineKind: 'machine kind',
  hazards: 'hazards',
  ppe: 'protective equipment',
  instruction: 'instruction',
  kind: 'kind of step',
  powered: 'power on',
  cautions: 'cautions',
  inputs: 'fields to fill in',
  computed: 'worked-out values',
  id: 'id',
  label: 'label',
  help: 'help',
  type: 'type',
  required: 'needed',
  requiredWhen: 'needed when',
  unit: 'unit',
  decimals: 'decimals',
  limits: 'limits',
  options: 'answers',
  pass: 'passing answers',
  expected: 'expected answer',
  maxLength: 'longest text',
  min: 'fewest photos',
  max: 'most photos',
  fn: 'maths function',
  args: 'arguments',
  output: 'output',
  acceptable: 'acceptable results',
  advisory: 'results to warn about',
  when: 'worked out when',
};
