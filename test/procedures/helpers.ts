import assert from 'node:assert/strict';
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_MACHINES } from '../../api/db/seed';
import { evaluateStep, type ComputedResult, type EntryValues, type InputResult, type MachineSpec, type StepEvaluation } from '../../procedures/engine';
import { procedureSchema, type Procedure, type Step } from '../../procedures/schema';

/** The bandsaw content pack's folder. */
export const PACK_DIR = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'procedures', 'bandsaw');

/** One procedure version file as found on disk. */
export interface PackFile {
  folder: string;
  file: string;
  raw: unknown;
}

/** Every `<folder>/<file>.json` under procedures/bandsaw, in name order. */
export function packFiles(): PackFile[] {
  const files: PackFile[] = [];
  for (const folder of readdirSync(PACK_DIR, { withFileTypes: true }).filter((d) => d.isDirectory()).map((d) => d.name).sort()) {
    for (const file of readdirSync(join(PACK_DIR, folder)).filter((f) => f.endsWith('.json')).sort()) {
      files.push({ folder, file, raw: JSON.parse(readFileSync(join(PACK_DIR, folder, file), 'utf8')) as unknown });
    }
  }
  return files;
}

/** Every procedure in the pack, parsed. */
export function packProcedures(): Procedure[] {
  return packFiles().map((f) => procedureSchema.parse(f.raw));
}

/** A procedure of the pack by key (version 1). */
export function procedure(key: string): Procedure {
  const found = packProcedures().find((p) => p.key === key && p.version === 1);
  assert.ok(found, `the pack has no procedure "${key}" v1`);
  return found;
}

/** A step of a procedure by id. */
export function step(key: string, id: string): Step {
  const found = procedure(key).steps.find((s) => s.id === id);
  assert.ok(found, `procedure "${key}" has no step "${id}"`);
  return found;
}

/** The two demo saws' specifications, by asset tag. */
export const demoSpecs: { tag: string; spec: MachineSpec }[] = DEMO_MACHINES.map((m) => ({ tag: m.assetTag, spec: m.spec as unknown as MachineSpec }));

/** The first demo saw (Bay 2): 300 mm wheels, 27 × 0.9 mm blade, tension read as wheel load 700–900 kgf. */
export const bay2 = demoSpecs[0]!.spec;

/** A copy of the demo spec with some figures replaced, for checks against published worked examples. */
export function specWith(changes: Record<string, unknown>): MachineSpec {
  return { ...structuredClone(bay2), ...changes };
}

/** Evaluate a pack step on a spec. */
export function run(key: string, stepId: string, values: EntryValues, spec: MachineSpec = bay2): StepEvaluation {
  return evaluateStep(step(key, stepId), values, spec);
}

export function computedOf(e: StepEvaluation, id: string): ComputedResult {
  const c = e.computed.find((x) => x.id === id);
  assert.ok(c, `no computed value "${id}"`);
  return c;
}

export function inputOf(e: StepEvaluation, id: string): InputResult {
  const i = e.inputs.find((x) => x.id === id);
  assert.ok(i, `no input "${id}"`);
  return i;
}

/** The numeric value of a computed result (fails the test when it is pending or text). */
export function numberOf(e: StepEvaluation, id: string): number {
  const v = computedOf(e, id).value;
  assert.equal(typeof v, 'number', `computed "${id}" should be a number, got ${String(v)}`);
  return v as number;
}

/** Asserts |actual − expected| ≤ tolerance, with both figures in the message. */
export function near(actual: number, expected: number, tolerance: number, what = 'value'): void {
  assert.ok(Math.abs(actual - expected) <= tolerance, `${what}: expected ${expected} ± ${tolerance}, got ${actual}`);
}

/** Walks an argument template, calling `visit` on every object node (the template language's references). */
export function walkTemplate(template: unknown, visit: (node: Record<string, unknown>) => void): void {
  if (Array.isArray(template)) {
    template.forEach((t) => walkTemplate(t, visit));
    return;
  }
  if (template === null || typeof template !== 'object') return;
  const node = template as Record<string, unknown>;
  visit(node);
  for (const value of Object.values(node)) walkTemplate(value, visit);
}

/** Reads a dot path out of a spec; undefined when any part is missing. */
export function specAt(spec: MachineSpec, path: string): unknown {
  let at: unknown = spec;
  for (const part of path.split('.')) {
    if (at === null || typeof at !== 'object') return undefined;
    at = (at as Record<string, unknown>)[part];
  }
  return at;
}

/** Every `$input` id a computed field's arguments use (directly). */
export function inputsUsed(args: unknown): string[] {
  const ids: string[] = [];
  walkTemplate(args, (node) => {
    if (typeof node['$input'] === 'string') ids.push(node['$input']);
  });
  return ids;
}
