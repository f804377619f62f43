import { isMathsFunctionName } from './maths';
import type { Bound, Limits, Procedure, Step } from './schema';

// The checks a procedure needs beyond its schema: every name it uses must point at something
// that exists. The pack tests, the server (on saving and approving a draft) and the draft editor
// (live, as the author types) all run these same checks.

/** One broken reference: where it is (a path into the procedure, as zod gives) and what is wrong. */
export interface ReferenceProblem {
  path: (string | number)[];
  message: string;
}

/** A machine specification to try `$spec` and `$each` references against (optional: specs differ per machine). */
export interface SpecSample {
  name: string;
  spec: Record<string, unknown>;
}

type Path = (string | number)[];

/** Read a dot path out of a specification; undefined when any part is missing. */
export function specAt(spec: Record<string, unknown>, path: string): unknown {
  let at: unknown = spec;
  for (const part of path.split('.')) {
    if (at === null || typeof at !== 'object') return undefined;
    at = (at as Record<string, unknown>)[part];
  }
  return at;
}

/** Visit every object node of an argument template with its path (the template language's references live in objects). */
export function walkArgs(template: unknown, visit: (node: Record<string, unknown>, path: Path) => void, path: Path = []): void {
  if (Array.isArray(template)) {
    template.forEach((t, i) => walkArgs(t, visit, [...path, i]));
    return;
  }
  if (template === null || typeof template !== 'object') return;
  const node = template as Record<string, unknown>;
  visit(node, path);
  for (const [k, v] of Object.entries(node)) walkArgs(v, visit, [...path, k]);
}

function specBoundProblems(limits: Limits | undefined, at: Path, specs: readonly SpecSample[]): ReferenceProblem[] {
  if (!limits) return [];
  const out: ReferenceProblem[] = [];
  const { min, max } = limits;
  if (typeof min === 'number' && typeof max === 'number' && min > max) {
    out.push({ path: [...at, 'max'], message: `The maximum (${max}) is below the minimum (${min}).` });
  }
  for (const [side, bound] of [['min', min], ['max', max]] as [string, Bound | undefined][]) {
    if (bound === undefined || typeof bound === 'number') continue;
    for (const { name, spec } of specs) {
      if (typeof specAt(spec, bound.$spec) !== 'number') {
        out.push({ path: [...at, side, '$spec'], message: `${name} has no figure at "${bound.$spec}".` });
      }
    }
  }
  return out;
}

/** The references of one step. `at` is the step's own path (e.g. ['steps', 2]), so problems point into the whole procedure. */
export function checkStepReferences(step: Step, at: Path = [], specs: readonly SpecSample[] = []): ReferenceProblem[] {
  const out: ReferenceProblem[] = [];
  const inputs = new Map(step.inputs.map((input) => [input.id, input]));

  step.inputs.forEach((input, i) => {
    const here: Path = [...at, 'inputs', i];
    if (input.requiredWhen) {
      const other = inputs.get(input.requiredWhen.input);
      if (!other || other.id === input.id) {
        out.push({ path: [...here, 'requiredWhen', 'input'], message: `"Needed when" must name another field of this step; there is no "${input.requiredWhen.input}".` });
      } else if (other.type === 'choice') {
        const values = new Set(other.options.map((o) => o.value));
        input.requiredWhen.in.forEach((answer, k) => {
          if (!values.has(String(answer))) out.push({ path: [...here, 'requiredWhen', 'in', k], message: `"${String(answer)}" is not one of the answers to "${other.label}".` });
        });
      } else if (other.type === 'yesno') {
        input.requiredWhen.in.forEach((answer, k) => {
          if (typeof answer !== 'boolean') out.push({ path: [...here, 'requiredWhen', 'in', k], message: `"${other.label}" is answered yes or no.` });
        });
      } else {
        out.push({ path: [...here, 'requiredWhen', 'input'], message: `"Needed when" can only follow a choice or a yes/no field; "${other.label}" is neither.` });
      }
    }
    switch (input.type) {
      case 'choice': {
        const seen = new Set<string>();
        input.options.forEach((o, k) => {
          if (seen.has(o.value)) out.push({ path: [...here, 'options', k, 'value'], message: `The answer "${o.value}" is listed twice.` });
          seen.add(o.value);
        });
        (input.pass ?? []).forEach((value, k) => {
          if (!seen.has(value)) out.push({ path: [...here, 'pass', k], message: `"${value}" is not one of the answers.` });
        });
        break;
      }
      case 'photo':
        if (input.min > input.max) out.push({ path: [...here, 'max'], message: `The most photos (${input.max}) is fewer than the fewest (${input.min}).` });
        break;
      case 'number':
        out.push(...specBoundProblems(input.limits, [...here, 'limits'], specs));
        break;
      default:
        break;
    }
  });

  const earlier = new Set<string>();
  step.computed.forEach((c, i) => {
    const here: Path = [...at, 'computed', i];
    if (!isMathsFunctionName(c.fn)) out.push({ path: [...here, 'fn'], message: `There is no maths function called "${c.fn}".` });
    const eachDepth: Path[] = [];
    walkArgs(c.args, (node, path) => {
      const where = [...here, 'args', ...path];
      if ('$input' in node && !inputs.has(String(node['$input']))) {
        out.push({ path: [...where, '$input'], message: `This step has no field "${String(node['$input'])}".` });
      }
      if ('$computed' in node && !earlier.has(String(node['$computed']))) {
        out.push({ path: [...where, '$computed'], message: `"${String(node['$computed'])}" is not a value worked out earlier in this step.` });
      }
      if ('$each' in node) {
        eachDepth.push(path);
        for (const { name, spec } of specs) {
          const list = specAt(spec, String(node['$each']));
          if (!Array.isArray(list) || list.length === 0) {
            out.push({ path: [...where, '$each'], message: `${name}'s "${String(node['$each'])}" is not a list.` });
            continue;
          }
          walkArgs(node['as'], (item, itemPath) => {
            if (!('$item' in item)) return;
            const field = String(item['$item']);
            if ((list as unknown[]).some((entry) => specAt((entry ?? {}) as Record<string, unknown>, field) === undefined)) {
              out.push({ path: [...where, 'as', ...itemPath, '$item'], message: `An item of ${name}'s "${String(node['$each'])}" has no "${field}".` });
            }
          });
        }
      }
      if ('$item' in node && !eachDepth.some((p) => path.length > p.length && p.every((part, k) => path[k] === part) && path[p.length] === 'as')) {
        out.push({ path: [...where, '$item'], message: '"$item" only has a meaning inside the "as" of an "$each".' });
      }
      if ('$spec' in node) {
        for (const { name, spec } of specs) {
          if (specAt(spec, String(node['$spec'])) === undefined) out.push({ path: [...where, '$spec'], message: `${name} has no "${String(node['$spec'])}".` });
        }
      }
    });
    (c.when ?? []).forEach((id, k) => {
      if (!inputs.has(id)) out.push({ path: [...here, 'when', k], message: `This step has no field "${id}".` });
    });
    out.push(...specBoundProblems(c.limits, [...here, 'limits'], specs));
    earlier.add(c.id);
  });
  return out;
}

/** Every broken reference in a procedure that has already passed `procedureSchema`. */
export function checkReferences(procedure: Procedure, specs: readonly SpecSample[] = []): ReferenceProblem[] {
  return procedure.steps.flatMap((step, s) => checkStepReferences(step, ['steps', s], specs));
}
