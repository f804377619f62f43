import { FormArray, FormControl, FormGroup, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import { checkReferences } from '@setwright/procedures/check-references';
import {
  ISO_7010_CODES,
  procedureSchema,
  STEP_KINDS,
  type Bound,
  type Caution,
  type ComputedField,
  type Limits,
  type Procedure,
  type ProcedureSource,
  type Step,
  type StepInput,
} from '@setwright/procedures/schema';

// The draft editor's typed form. Its shape follows the procedure's JSON exactly (steps/2/inputs/0/
// limits/min…), so a problem's pointer, from the server or from our own live check, names the
// control it belongs to. A few parts are edited in an easier shape (lists as text, arguments as
// JSON text, a bound as "number or machine figure") and converted back on the way out.

export type CautionLevel = Caution['level'];
export type StepKind = (typeof STEP_KINDS)[number];
export type InputType = StepInput['type'];
export type SignCode = (typeof ISO_7010_CODES)[number] | '';
export type BoundMode = 'none' | 'number' | 'spec';
export type Expected = 'either' | 'yes' | 'no';

export type BoundForm = FormGroup<{
  mode: FormControl<BoundMode>;
  value: FormControl<number | null>;
  $spec: FormControl<string>;
  unit: FormControl<string>;
}>;
export type LimitsForm = FormGroup<{ min: BoundForm; max: BoundForm }>;
export type CautionForm = FormGroup<{ level: FormControl<CautionLevel>; code: FormControl<SignCode>; text: FormControl<string> }>;
export type OptionForm = FormGroup<{ value: FormControl<string>; label: FormControl<string>; passes: FormControl<boolean> }>;
export type InputForm = FormGroup<{
  id: FormControl<string>;
  label: FormControl<string>;
  help: FormControl<string>;
  type: FormControl<InputType>;
  required: FormControl<boolean>;
  /** "Needed only when another field has one of these answers": the field, and the answers as text. */
  requiredWhen: FormGroup<{ input: FormControl<string>; in: FormControl<string> }>;
  unit: FormControl<string>;
  decimals: FormControl<number | null>;
  limits: LimitsForm;
  options: FormArray<OptionForm>;
  expected: FormControl<Expected>;
  maxLength: FormControl<number | null>;
  min: FormControl<number | null>;
  max: FormControl<number | null>;
}>;
export type ComputedForm = FormGroup<{
  id: FormControl<string>;
  label: FormControl<string>;
  fn: FormControl<string>;
  /** The arguments as JSON text. */
  args: FormControl<string>;
  output: FormControl<string>;
  unit: FormControl<string>;
  decimals: FormControl<number | null>;
  limits: LimitsForm;
  /** Lists, written one per line or separated by commas. */
  acceptable: FormControl<string>;
  advisory: FormControl<string>;
  when: FormControl<string>;
  help: FormControl<string>;
}>;
export type StepForm = FormGroup<{
  id: FormControl<string>;
  title: FormControl<string>;
  kind: FormControl<StepKind>;
  instruction: FormControl<string>;
  powered: FormControl<boolean>;
  cautions: FormArray<CautionForm>;
  inputs: FormArray<InputForm>;
  computed: FormArray<ComputedForm>;
}>;
export type ProcedureForm = FormGroup<{
  key: FormControl<string>;
  version: FormControl<number>;
  title: FormControl<string>;
  intendedUse: FormControl<string>;
  scope: FormControl<string>;
  machineKind: FormControl<string>;
  hazards: FormArray<FormControl<string>>;
  ppe: FormArray<CautionForm>;
  steps: FormArray<StepForm>;
}>;

/** One problem, as the API sends them: an RFC 6901 pointer in a URI fragment, and what is wrong. */
export interface FieldProblem {
  pointer: string;
  detail: string;
}

const text = (value = '') => new FormControl(value, { nonNullable: true });
const num = (value: number | null | undefined) => new FormControl<number | null>(value ?? null);

export function boundForm(b?: Bound): BoundForm {
  const isSpec = typeof b === 'object' && b !== null;
  return new FormGroup({
    mode: new FormControl<BoundMode>(b === undefined ? 'none' : isSpec ? 'spec' : 'number', { nonNullable: true }),
    value: num(typeof b === 'number' ? b : null),
    $spec: text(isSpec ? b.$spec : ''),
    unit: text(isSpec ? b.unit : ''),
  });
}

export function limitsForm(l?: Limits): LimitsForm {
  return new FormGroup({ min: boundForm(l?.min), max: boundForm(l?.max) });
}

export function cautionForm(c?: Caution): CautionForm {
  return new FormGroup({
    level: new FormControl<CautionLevel>(c?.level ?? 'warning', { nonNullable: true }),
    code: new FormControl<SignCode>(c?.code ?? '', { nonNullable: true }),
    text: text(c?.text),
  });
}

export function optionForm(value = '', label = '', passes = false): OptionForm {
  return new FormGroup({ value: text(value), label: text(label), passes: new FormControl(passes, { nonNullable: true }) });
}

const answersText = (answers: readonly (string | boolean)[]) => answers.map((a) => (a === true ? 'yes' : a === false ? 'no' : a)).join(', ');

export function inputForm(i?: StepInput, id = ''): InputForm {
  const options =
    i?.type === 'choice'
      ? i.options.map((o) => optionForm(o.value, o.label, !!i.pass?.includes(o.value)))
      : [optionForm(), optionForm()];
  return new FormGroup({
    id: text(i?.id ?? id),
    label: text(i?.label),
    help: text(i?.help),
    type: new FormControl<InputType>(i?.type ?? 'number', { nonNullable: true }),
    required: new FormControl(i?.required ?? true, { nonNullable: true }),
    requiredWhen: new FormGroup({ input: text(i?.requiredWhen?.input), in: text(i?.requiredWhen ? answersText(i.requiredWhen.in) : '') }),
    unit: text(i?.type === 'number' ? i.unit : ''),
    decimals: num(i?.type === 'number' ? i.decimals : 2),
    limits: limitsForm(i?.type === 'number' ? i.limits : undefined),
    options: new FormArray(options),
    expected: new FormControl<Expected>(i?.type === 'yesno' && i.expected !== undefined ? (i.expected ? 'yes' : 'no') : 'either', { nonNullable: true }),
    maxLength: num(i?.type === 'text' ? i.maxLength : 500),
    min: num(i?.type === 'photo' ? i.min : 1),
    max: num(i?.type === 'photo' ? i.max : 3),
  });
}

export function computedForm(c?: ComputedField, id = ''): ComputedForm {
  return new FormGroup({
    id: text(c?.id ?? id),
    label: text(c?.label),
    fn: text(c?.fn),
    args: text(JSON.stringify(c?.args ?? {}, null, 2)),
    output: text(c?.output),
    unit: text(c?.unit),
    decimals: num(c?.decimals ?? 2),
    limits: limitsForm(c?.limits),
    acceptable: text((c?.acceptable ?? []).join(', ')),
    advisory: text((c?.advisory ?? []).join(', ')),
    when: text((c?.when ?? []).join(', ')),
    help: text(c?.help),
  });
}

export function stepForm(s?: Step, id = ''): StepForm {
  return new FormGroup({
    id: text(s?.id ?? id),
    title: text(s?.title),
    kind: new FormControl<StepKind>(s?.kind ?? 'instruction', { nonNullable: true }),
    instruction: text(s?.instruction),
    powered: new FormControl(s?.powered ?? false, { nonNullable: true }),
    cautions: new FormArray((s?.cautions ?? []).map(cautionForm)),
    inputs: new FormArray((s?.inputs ?? []).map((i) => inputForm(i))),
    computed: new FormArray((s?.computed ?? []).map((c) => computedForm(c))),
  });
}

export function procedureForm(p: Procedure): ProcedureForm {
  return new FormGroup({
    key: text(p.key),
    version: new FormControl(p.version, { nonNullable: true }),
    title: text(p.title),
    intendedUse: text(p.intendedUse),
    scope: text(p.scope),
    machineKind: text(p.machineKind),
    hazards: new FormArray(p.hazards.map((h) => text(h))),
    ppe: new FormArray(p.ppe.map(cautionForm)),
    steps: new FormArray(p.steps.map((s) => stepForm(s))),
  });
}

/** An id not yet used in the list: prefix-1, prefix-2, … */
export function freshId(prefix: string, used: readonly string[]): string {
  for (let n = used.length + 1; ; n++) {
    const id = `${prefix}-${n}`;
    if (!used.includes(id)) return id;
  }
}

/** Move an item of a form array one place up (-1) or down (+1). */
export function moveItem(array: FormArray, index: number, by: -1 | 1): void {
  const to = index + by;
  if (to < 0 || to >= array.length) return;
  const item = array.at(index);
  array.removeAt(index, { emitEvent: false });
  array.insert(to, item);
}

const list = (value: string) =>
  value
    .split(/[\n,]/)
    .map((x) => x.trim())
    .filter(Boolean);
const optional = (value: string) => (value.trim() ? value : undefined);
const numberOrUndefined = (value: number | null) => (value === null || Number.isNaN(value) ? undefined : value);

function boundOut(b: BoundForm): Bound | undefined {
  const v = b.getRawValue();
  if (v.mode === 'number') return (v.value ?? Number.NaN) as number;
  if (v.mode === 'spec') return { $spec: v.$spec, unit: v.unit };
  return undefined;
}

function limitsOut(l: LimitsForm): Limits | undefined {
  const min = boundOut(l.controls.min);
  const max = boundOut(l.controls.max);
  if (min === undefined && max === undefined) return undefined;
  return { ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}) };
}

const cautionOut = (c: CautionForm): Caution => {
  const v = c.getRawValue();
  return { level: v.level, ...(v.code ? { code: v.code } : {}), text: v.text };
};

function inputOut(f: InputForm, siblings: InputForm[]): Record<string, unknown> {
  const v = f.getRawValue();
  const out: Record<string, unknown> = { id: v.id, label: v.label, type: v.type, required: v.required };
  if (optional(v.help)) out['help'] = v.help;
  if (v.requiredWhen.input) {
    const other = siblings.find((s) => s.controls.id.value === v.requiredWhen.input);
    const yesno = other?.controls.type.value === 'yesno';
    const answers = list(v.requiredWhen.in).map((a) => (yesno && /^(yes|no)$/i.test(a) ? a.toLowerCase() === 'yes' : a));
    out['requiredWhen'] = { input: v.requiredWhen.input, in: answers };
  }
  switch (v.type) {
    case 'number': {
      out['unit'] = v.unit;
      if (numberOrUndefined(v.decimals) !== undefined) out['decimals'] = v.decimals;
      const limits = limitsOut(f.controls.limits);
      if (limits) out['limits'] = limits;
      break;
    }
    case 'choice': {
      out['options'] = v.options.map((o) => ({ value: o.value, label: o.label }));
      const pass = v.options.filter((o) => o.passes).map((o) => o.value);
      if (pass.length) out['pass'] = pass;
      break;
    }
    case 'yesno':
      if (v.expected !== 'either') out['expected'] = v.expected === 'yes';
      break;
    case 'text':
      if (numberOrUndefined(v.maxLength) !== undefined) out['maxLength'] = v.maxLength;
      break;
    case 'photo':
      if (numberOrUndefined(v.min) !== undefined) out['min'] = v.min;
      if (numberOrUndefined(v.max) !== undefined) out['max'] = v.max;
      break;
  }
  return out;
}

function computedOut(f: ComputedForm, at: string, problems: FieldProblem[]): Record<string, unknown> {
  const v = f.getRawValue();
  let args: unknown = {};
  try {
    args = JSON.parse(v.args || '{}');
    if (args === null || typeof args !== 'object' || Array.isArray(args)) {
      problems.push({ pointer: `${at}/args`, detail: 'The arguments must be a JSON object: { "name": value, … }.' });
      args = {};
    }
  } catch (err) {
    problems.push({ pointer: `${at}/args`, detail: `This is not valid JSON: ${(err as Error).message}` });
    args = {};
  }
  const out: Record<string, unknown> = { id: v.id, label: v.label, fn: v.fn, args, output: v.output };
  if (optional(v.unit)) out['unit'] = v.unit;
  if (numberOrUndefined(v.decimals) !== undefined) out['decimals'] = v.decimals;
  const limits = limitsOut(f.controls.limits);
  if (limits) out['limits'] = limits;
  if (list(v.acceptable).length) out['acceptable'] = list(v.acceptable);
  if (list(v.advisory).length) out['advisory'] = list(v.advisory);
  if (list(v.when).length) out['when'] = list(v.when);
  if (optional(v.help)) out['help'] = v.help;
  return out;
}

/** The form as a procedure body, plus the problems found while converting it (arguments that are not JSON). */
export function formToSource(form: ProcedureForm): { body: ProcedureSource; problems: FieldProblem[] } {
  const problems: FieldProblem[] = [];
  const c = form.controls;
  const body = {
    key: c.key.value,
    version: c.version.value,
    title: c.title.value,
    intendedUse: c.intendedUse.value,
    scope: c.scope.value,
    machineKind: c.machineKind.value,
    hazards: c.hazards.controls.map((h) => h.value),
    ppe: c.ppe.controls.map(cautionOut),
    steps: c.steps.controls.map((s, i) => {
      const sv = s.getRawValue();
      return {
        id: sv.id,
        title: sv.title,
        kind: sv.kind,
        instruction: sv.instruction,
        powered: sv.powered,
        cautions: s.controls.cautions.controls.map(cautionOut),
        inputs: s.controls.inputs.controls.map((f) => inputOut(f, s.controls.inputs.controls)),
        computed: s.controls.computed.controls.map((f, k) => computedOut(f, `#/steps/${i}/computed/${k}`, problems)),
      };
    }),
  } as ProcedureSource;
  return { body, problems };
}

const pointerOf = (path: readonly PropertyKey[]) => '#/' + path.map((p) => String(p).replace(/~/g, '~0').replace(/\//g, '~1')).join('/');

/**
 * Check the form as the server will: the same schema, then the same reference checks.
 * Returns the parsed procedure when it is sound.
 */
export function checkDraft(form: ProcedureForm): { procedure: Procedure | null; problems: FieldProblem[] } {
  const { body, problems } = formToSource(form);
  const parsed = procedureSchema.safeParse(body);
  if (!parsed.success) {
    const found = parsed.error.issues.map((i) => ({ pointer: pointerOf(i.path), detail: i.message }));
    return { procedure: null, problems: [...problems, ...found] };
  }
  const refs = checkReferences(parsed.data).map((p) => ({ pointer: pointerOf(p.path), detail: p.message }));
  const all = [...problems, ...refs];
  return { procedure: all.length ? null : parsed.data, problems: all };
}

/** The deepest control a pointer reaches: '#/steps/0/computed/1/args/force/$input' lands on that value's args. */
export function nearestControl(form: AbstractControl, pointer: string): AbstractControl {
  const path = pointer
    .replace(/^#\/?/, '')
    .split('/')
    .filter((p) => p !== '')
    .map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~'));
  let at: AbstractControl = form;
  for (const part of path) {
    const next = at.get([part]);
    if (!next) break;
    at = next;
  }
  return at;
}

function eachControl(control: AbstractControl, visit: (c: AbstractControl) => void): void {
  visit(control);
  if (control instanceof FormGroup || control instanceof FormArray) {
    for (const child of Object.values(control.controls) as AbstractControl[]) eachControl(child, visit);
  }
}

/** What is shown on a control: our own check's finding, and the server's (kept while the value is the one it judged). */
interface Marks {
  check?: string;
  server?: string;
  serverValue?: string;
}
const MARKS = new WeakMap<AbstractControl, Marks>();

/**
 * The validator behind every shown problem. Problems live in validators rather than in bare
 * setErrors() so they survive a control being bound again (a step panel opening re-binds its
 * fields), and the server's word on a field lapses as soon as the field is changed.
 */
const problemValidator: ValidatorFn = (control) => {
  const marks = MARKS.get(control);
  if (!marks) return null;
  const errors: ValidationErrors = {};
  if (marks.server !== undefined && marks.serverValue === JSON.stringify(control.value)) errors['server'] = marks.server;
  if (marks.check !== undefined) errors['check'] = marks.check;
  return Object.keys(errors).length ? errors : null;
};

/**
 * Show problems on the controls they point at, under one key ('check' for the live check,
 * 'server' for the server's answer), replacing what that key showed before. Problems that land
 * on the whole form are returned for the page to list.
 */
export function showProblems(form: ProcedureForm, problems: readonly FieldProblem[], key: 'check' | 'server'): FieldProblem[] {
  const changed = new Set<AbstractControl>();
  eachControl(form, (c) => {
    const marks = MARKS.get(c);
    if (marks?.[key] === undefined) return;
    delete marks[key];
    changed.add(c);
  });
  const unplaced: FieldProblem[] = [];
  const byControl = new Map<AbstractControl, string[]>();
  for (const p of problems) {
    const control = nearestControl(form, p.pointer);
    if (control === form) {
      unplaced.push(p);
      continue;
    }
    byControl.set(control, [...(byControl.get(control) ?? []), p.detail]);
  }
  for (const [control, details] of byControl) {
    const marks = MARKS.get(control) ?? {};
    marks[key] = [...new Set(details)].join(' ');
    if (key === 'server') {
      marks.serverValue = JSON.stringify(control.value);
      control.markAsTouched();
    }
    MARKS.set(control, marks);
    if (!control.hasValidator(problemValidator)) control.addValidators(problemValidator);
    changed.add(control);
  }
  for (const c of changed) c.updateValueAndValidity({ emitEvent: false });
  return unplaced;
}

/** The message to show for a control: the server's answer first, then our own check's. */
export function problemOf(control: AbstractControl | null | undefined): string | null {
  const errors = control?.errors;
  if (!errors) return null;
  return (errors['server'] as string | undefined) ?? (errors['check'] as string | undefined) ?? null;
}

/** True when any control inside has a problem to show. */
export function hasProblems(control: AbstractControl): boolean {
  let found = false;
  eachControl(control, (c) => {
    if (problemOf(c)) found = true;
  });
  return found;
}
