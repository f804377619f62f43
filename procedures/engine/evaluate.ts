import { callMathsFunction, isAbove, isBelow, isMathsFunctionName, MathsInputError, quantity, textBeside, valueIn, type Quantity } from '../maths';
import type { Bound, ComputedField, Limits, Step, StepInput } from '../schema';

// Evaluates one step's entries against its limits and works out its computed values, with the
// same code on the tablet (live feedback) and on the server (the authority).

/** What a person entered for one input: a number, a choice, yes/no, text, or photo ids. */
export type EntryValue = number | string | boolean | string[] | null;
export type EntryValues = Record<string, EntryValue | undefined>;
export type MachineSpec = Record<string, unknown>;

/** pass / fail against limits; 'missing' when required and empty; 'none' when there is nothing to judge. */
export type Outcome = 'pass' | 'warn' | 'fail' | 'missing' | 'none';

export interface ResolvedLimits {
  min?: number;
  max?: number;
  unit?: string;
}

export interface InputResult {
  id: string;
  outcome: Outcome;
  limits?: ResolvedLimits;
  message?: string;
}

export interface ComputedResult {
  id: string;
  label: string;
  /** The selected output, in the display unit when it is a quantity; null while inputs are missing or on error. */
  value: number | string | null;
  unit?: string;
  display: string;
  outcome: Outcome;
  limits?: ResolvedLimits;
  /** When the maths refused its arguments: which argument and why. */
  error?: { argument: string; message: string };
  /** The whole result of the maths function, for the screens that show more (basis, verdict message…). */
  detail?: unknown;
}

export interface StepEvaluation {
  inputs: InputResult[];
  computed: ComputedResult[];
  /** Every required input has a value. */
  complete: boolean;
  /** Some input or computed value is outside its limits: a corrective note is needed. */
  outOfLimits: boolean;
  missing: string[];
}

/** A problem in the procedure itself (a bad reference): the author's mistake, never the trainee's. */
export class ProcedureDefinitionError extends Error {}

class Pending extends Error {}

function getPath(source: unknown, path: string): unknown {
  if (!path) return source;
  let at: unknown = source;
  for (const part of path.split('.')) {
    if (at === null || typeof at !== 'object') return undefined;
    at = (at as Record<string, unknown>)[part];
  }
  return at;
}

function isEmpty(v: EntryValue | undefined): boolean {
  return v === undefined || v === null || v === '' || (Array.isArray(v) && v.length === 0) || (typeof v === 'number' && !Number.isFinite(v));
}

function isQuantity(v: unknown): v is Quantity {
  return !!v && typeof v === 'object' && typeof (v as Quantity).value === 'number' && typeof (v as Quantity).unit === 'string';
}

function specValue(spec: MachineSpec, path: string): unknown {
  const v = getPath(spec, path);
  if (v === undefined || v === null) throw new ProcedureDefinitionError(`The machine's specification has no "${path}".`);
  return v;
}

interface Scope {
  step: Step;
  values: EntryValues;
  spec: MachineSpec;
  computed: Map<string, ComputedResult>;
  item?: Record<string, unknown>;
}

/** Resolve an argument template into the value the maths function takes. */
function resolve(template: unknown, scope: Scope): unknown {
  if (Array.isArray(template)) return template.map((t) => resolve(t, scope));
  if (template === null || typeof template !== 'object') return template;
  const t = template as Record<string, unknown>;
  if ('$input' in t) {
    const input = scope.step.inputs.find((i) => i.id === t['$input']);
    if (!input) throw new ProcedureDefinitionError(`There is no input "${String(t['$input'])}" in step "${scope.step.id}".`);
    const v = scope.values[input.id];
    if (isEmpty(v)) throw new Pending();
    return input.type === 'number' && t['plain'] !== true ? quantity(Number(v), input.unit) : v;
  }
  if ('$spec' in t) {
    const v = specValue(scope.spec, String(t['$spec']));
    return typeof t['unit'] === 'string' ? quantity(Number(v), t['unit']) : v;
  }
  if ('$item' in t) {
    const v = getPath(scope.item, String(t['$item']));
    if (v === undefined) throw new ProcedureDefinitionError(`A list item has no "${String(t['$item'])}".`);
    return typeof t['unit'] === 'string' ? quantity(Number(v), t['unit']) : v;
  }
  if ('$computed' in t) {
    const c = scope.computed.get(String(t['$computed']));
    if (!c) throw new ProcedureDefinitionError(`There is no earlier computed value "${String(t['$computed'])}".`);
    if (c.value === null) throw new Pending();
    return typeof c.value === 'number' && c.unit ? quantity(c.value, c.unit) : c.value;
  }
  if ('$q' in t) return quantity(Number(t['$q']), String(t['unit']));
  if ('$each' in t) {
    const list = specValue(scope.spec, String(t['$each']));
    if (!Array.isArray(list)) throw new ProcedureDefinitionError(`"${String(t['$each'])}" in the specification is not a list.`);
    return list.map((item) => resolve(t['as'], { ...scope, item: item as Record<string, unknown> }));
  }
  return Object.fromEntries(Object.entries(t).map(([k, v]) => [k, resolve(v, scope)]));
}

function resolveBound(bound: Bound | undefined, spec: MachineSpec, unit: string | undefined): number | undefined {
  if (bound === undefined) return undefined;
  if (typeof bound === 'number') return bound;
  const raw = Number(specValue(spec, bound.$spec));
  if (!unit || unit === bound.unit) return raw;
  return Number(valueIn(quantity(raw, bound.unit), unit).toPrecision(12));
}

export function resolveLimits(limits: Limits | undefined, spec: MachineSpec, unit?: string): ResolvedLimits | undefined {
  if (!limits) return undefined;
  return { min: resolveBound(limits.min, spec, unit), max: resolveBound(limits.max, spec, unit), unit };
}

/**
 * Within limits, judged on the raw value as entered or worked out: never on the figure as rounded
 * for the screen (0.1047 is over a 0.10 maximum even where two decimals would show "0.10").
 * Only float noise from unit conversion is forgiven.
 */
export function withinLimits(value: number, limits: ResolvedLimits | undefined): boolean {
  if (!limits) return true;
  if (!Number.isFinite(value)) return false;
  if (limits.min !== undefined && isBelow(value, limits.min)) return false;
  if (limits.max !== undefined && isAbove(value, limits.max)) return false;
  return true;
}

/** Required outright, or because another input has one of the named answers. */
function isRequired(input: StepInput, values: EntryValues): boolean {
  if (input.requiredWhen) return input.requiredWhen.in.includes(values[input.requiredWhen.input] as string | boolean);
  return input.required;
}

function judgeInput(input: StepInput, values: EntryValues, spec: MachineSpec): InputResult {
  const value = values[input.id];
  if (isEmpty(value)) {
    const limits = input.type === 'number' ? resolveLimits(input.limits, spec, input.unit) : undefined;
    return { id: input.id, outcome: isRequired(input, values) ? 'missing' : 'none', limits };
  }
  switch (input.type) {
    case 'number': {
      const limits = resolveLimits(input.limits, spec, input.unit);
      if (!limits) return { id: input.id, outcome: 'none' };
      const ok = withinLimits(Number(value), limits);
      return { id: input.id, outcome: ok ? 'pass' : 'fail', limits, message: ok ? undefined : limitMessage(limits) };
    }
    case 'choice':
      if (!input.pass) return { id: input.id, outcome: 'none' };
      return { id: input.id, outcome: input.pass.includes(String(value)) ? 'pass' : 'fail' };
    case 'yesno':
      if (input.expected === undefined) return { id: input.id, outcome: 'none' };
      return { id: input.id, outcome: value === input.expected ? 'pass' : 'fail' };
    case 'photo': {
      const count = Array.isArray(value) ? value.length : 0;
      if (count < input.min) return { id: input.id, outcome: 'missing', message: `Take at least ${input.min} photo${input.min === 1 ? '' : 's'}.` };
      return { id: input.id, outcome: 'none' };
    }
    default:
      return { id: input.id, outcome: 'none' };
  }
}

function limitMessage(l: ResolvedLimits): string {
  const u = l.unit ? ` ${l.unit}` : '';
  const n = (v: number) => String(Number(v.toPrecision(6)));
  if (l.min !== undefined && l.max !== undefined) return `Outside ${n(l.min)}–${n(l.max)}${u}.`;
  if (l.min !== undefined) return `Below the minimum of ${n(l.min)}${u}.`;
  return `Above the maximum of ${n(l.max!)}${u}.`;
}

function compute(field: ComputedField, scope: Scope): ComputedResult {
  const base = { id: field.id, label: field.label, unit: field.unit };
  if (!isMathsFunctionName(field.fn)) throw new ProcedureDefinitionError(`There is no maths function "${field.fn}".`);
  if (field.when?.some((id) => isEmpty(scope.values[id]))) return { ...base, value: null, display: '—', outcome: 'none' };
  let args: unknown;
  try {
    args = resolve(field.args, scope);
  } catch (err) {
    if (err instanceof Pending) return { ...base, value: null, display: '—', outcome: 'none' };
    throw err;
  }
  let result: unknown;
  try {
    result = callMathsFunction(field.fn, args);
  } catch (err) {
    if (err instanceof MathsInputError) {
      return { ...base, value: null, display: '—', outcome: 'fail', error: { argument: err.argument, message: err.message } };
    }
    throw err;
  }
  const out = getPath(result, field.output);
  if (out === null || out === undefined) {
    return { ...base, value: null, display: 'No result', outcome: field.limits || field.acceptable ? 'fail' : 'none', detail: result };
  }
  if (isQuantity(out) || typeof out === 'number') {
    const value = isQuantity(out) ? (field.unit ? valueIn(out, field.unit) : out.value) : out;
    const unit = isQuantity(out) ? (field.unit ?? out.unit) : field.unit;
    const limits = resolveLimits(field.limits, scope.spec, unit);
    if (!Number.isFinite(value)) {
      const error = { argument: 'result', message: 'these figures give no finite result; check each of them' };
      return { ...base, unit, value: null, display: '—', outcome: 'fail', limits, error, detail: result };
    }
    const outcome: Outcome = limits ? (withinLimits(value, limits) ? 'pass' : 'fail') : 'none';
    // Enough decimals that a value past a limit never shows as equal to it.
    const display = `${textBeside(value, field.decimals, [limits?.min, limits?.max])}${unit ? ' ' + unit : ''}`;
    return { ...base, unit, value, display, outcome, limits, detail: result };
  }
  const value = String(out);
  let outcome: Outcome = 'none';
  if (field.advisory?.includes(value)) outcome = 'warn';
  else if (field.acceptable) outcome = field.acceptable.includes(value) ? 'pass' : 'fail';
  return { ...base, unit: undefined, value, display: value, outcome, detail: result };
}

/** Judge every input of a step and work out its computed values, in order. */
export function evaluateStep(step: Step, values: EntryValues, spec: MachineSpec): StepEvaluation {
  const inputs = step.inputs.map((input) => judgeInput(input, values, spec));
  const scope: Scope = { step, values, spec, computed: new Map() };
  const computed: ComputedResult[] = [];
  for (const field of step.computed) {
    const result = compute(field, scope);
    scope.computed.set(field.id, result);
    computed.push(result);
  }
  const missing = inputs.filter((i) => i.outcome === 'missing').map((i) => i.id);
  const outOfLimits = inputs.some((i) => i.outcome === 'fail') || computed.some((c) => c.outcome === 'fail');
  return { inputs, computed, complete: missing.length === 0, outOfLimits, missing };
}
