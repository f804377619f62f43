import { z } from 'zod';

// The procedure language: one JSON file per procedure version, validated by this schema on
// load (server) and in the draft editor (client). Nothing here knows about bandsaws.

const id = z
  .string()
  .min(1)
  .max(60)
  .regex(/^[a-z][a-z0-9-]*$/, 'Use lower-case letters, digits and hyphens, starting with a letter.');
const text = (max: number) => z.string().trim().min(1, 'Write something here.').max(max);

/** ISO 7010 safety sign codes our cautions may carry (we draw our own pictograms). */
export const ISO_7010_CODES = ['M002', 'M004', 'M009', 'M021', 'W001', 'W012', 'W018', 'W019', 'W022', 'P010', 'P012'] as const;

/** ISO 3864 meaning of a caution: decides its colour. */
export const cautionLevelSchema = z.enum(['mandatory', 'warning', 'prohibition']);

export const cautionSchema = z.object({
  level: cautionLevelSchema,
  code: z.enum(ISO_7010_CODES).optional(),
  text: text(400),
});
export type Caution = z.infer<typeof cautionSchema>;

/**
 * A value an argument, a limit or a default may take:
 * - { "$input": "gap" } the step's input (a quantity in the input's unit, or the raw choice/yes-no/text;
 *   add "plain": true for a bare number such as a count)
 * - { "$spec": "wheelDiameterMm", "unit": "mm" } a machine specification figure (a quantity when a unit is given)
 * - { "$computed": "span" } an earlier computed value of the same step (its selected output)
 * - { "$q": 100, "unit": "mm" } a literal quantity
 * - { "$each": "speedSteps", "as": { … "$item": "driverMm" … } } a list built from a specification array
 * - anything else: a literal
 */
export type ArgTemplate = unknown;

const specPath = z.string().regex(/^[A-Za-z][A-Za-z0-9]*(\.[A-Za-z][A-Za-z0-9]*)*$/, 'A specification path like tensionRangeKgf.min');
const unit = z.string().min(1).max(30);

/** A limit bound: a literal number (in the value's display unit) or a machine specification figure in a stated unit. */
export const boundSchema = z.union([z.number().finite(), z.object({ $spec: specPath, unit })]);
export type Bound = z.infer<typeof boundSchema>;

export const limitsSchema = z
  .object({ min: boundSchema.optional(), max: boundSchema.optional() })
  .refine((l) => l.min !== undefined || l.max !== undefined, 'Give a minimum, a maximum or both.');
export type Limits = z.infer<typeof limitsSchema>;

const inputBase = {
  id,
  label: text(120),
  help: z.string().max(400).optional(),
  required: z.boolean().default(true),
  /** Required only when another input of the step has one of these answers (e.g. the gauge reading, when the method is "gauge"). */
  requiredWhen: z.object({ input: id, in: z.array(z.union([z.string(), z.boolean()])).min(1) }).optional(),
};

export const inputSchema = z.discriminatedUnion('type', [
  z.object({
    ...inputBase,
    type: z.literal('number'),
    unit,
    decimals: z.number().int().min(0).max(4).default(2),
    limits: limitsSchema.optional(),
  }),
  z.object({
    ...inputBase,
    type: z.literal('choice'),
    options: z.array(z.object({ value: id, label: text(120) })).min(2),
    /** Options that count as a pass; when absent, any option passes. */
    pass: z.array(id).optional(),
  }),
  z.object({
    ...inputBase,
    type: z.literal('yesno'),
    /** The answer that counts as a pass; when absent, either passes. */
    expected: z.boolean().optional(),
  }),
  z.object({ ...inputBase, type: z.literal('text'), maxLength: z.number().int().min(1).max(2000).default(500) }),
  z.object({
    ...inputBase,
    type: z.literal('photo'),
    min: z.number().int().min(0).max(10).default(1),
    max: z.number().int().min(1).max(10).default(3),
  }),
]);
export type StepInput = z.infer<typeof inputSchema>;

export const computedSchema = z.object({
  id,
  label: text(120),
  /** The name of a function in procedures/maths (its registry, `mathsFunctions`). */
  fn: z.string().min(1),
  args: z.record(z.string(), z.unknown()),
  /** A dot path into the function's result, e.g. "stress" or "step.label"; empty for the whole result. */
  output: z.string().default(''),
  /** Display unit for a quantity result (converted through the units library). */
  unit: unit.optional(),
  decimals: z.number().int().min(0).max(4).default(2),
  limits: limitsSchema.optional(),
  /** For a text result (e.g. a verdict): the values that count as a pass. */
  acceptable: z.array(z.string()).optional(),
  /** Text results that pass but deserve a warning on screen and in the record (e.g. a stress below the usual target). */
  advisory: z.array(z.string()).optional(),
  help: z.string().max(400).optional(),
  /** Only computed when these inputs have values (others are optional). Defaults to every $input the args use. */
  when: z.array(id).optional(),
});
export type ComputedField = z.infer<typeof computedSchema>;

export const STEP_KINDS = ['instruction', 'isolation', 'reading', 'check', 'photo'] as const;

export const stepSchema = z.object({
  id,
  title: text(120),
  kind: z.enum(STEP_KINDS),
  instruction: text(3000),
  cautions: z.array(cautionSchema).default([]),
  /** Run with power on: needs a competent person's witness. */
  powered: z.boolean().default(false),
  inputs: z.array(inputSchema).default([]),
  computed: z.array(computedSchema).default([]),
});
export type Step = z.infer<typeof stepSchema>;

export const procedureSchema = z
  .object({
    key: id,
    version: z.number().int().min(1),
    title: text(120),
    intendedUse: text(1000),
    scope: text(1000),
    machineKind: id.or(z.string().regex(/^[a-z][a-z0-9_]*$/)),
    hazards: z.array(text(300)).min(1),
    ppe: z.array(cautionSchema).default([]),
    steps: z.array(stepSchema).min(1),
  })
  .superRefine((p, ctx) => {
    const stepIds = new Set<string>();
    p.steps.forEach((step, s) => {
      if (stepIds.has(step.id)) ctx.addIssue({ code: 'custom', path: ['steps', s, 'id'], message: `Step id "${step.id}" is used twice.` });
      stepIds.add(step.id);
      const names = new Set<string>();
      const check = (name: string, path: (string | number)[]) => {
        if (names.has(name)) ctx.addIssue({ code: 'custom', path, message: `"${name}" is used twice in this step.` });
        names.add(name);
      };
      step.inputs.forEach((input, i) => check(input.id, ['steps', s, 'inputs', i, 'id']));
      step.computed.forEach((c, i) => check(c.id, ['steps', s, 'computed', i, 'id']));
    });
  });
export type Procedure = z.infer<typeof procedureSchema>;
export type ProcedureSource = z.input<typeof procedureSchema>;
