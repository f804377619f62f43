import { z } from 'zod';

/**
 * A machine's specification, checked per machine kind. The procedures (`$spec` references) and
 * Workshop maths read these figures by these names, so the names never change.
 * Shared by the API and the client (the edit form checks with the same schema before sending).
 */

export const MACHINE_KINDS = ['horizontal_bandsaw'] as const;
export type MachineKind = (typeof MACHINE_KINDS)[number];

export const MACHINE_KIND_LABELS: Record<MachineKind, string> = {
  horizontal_bandsaw: 'Horizontal bandsaw',
};

/** What a tension gauge on this machine reads: the load on the wheel (shared by two strands) or one strand. */
export const TENSION_READS = ['wheel-load', 'strand'] as const;
export type TensionReads = (typeof TENSION_READS)[number];

export const TENSION_READS_LABELS: Record<TensionReads, string> = {
  'wheel-load': 'Load on the wheel (two strands share it)',
  strand: 'Tension in one strand',
};

/** A figure that must be a finite number above nought, with a message naming it and its unit. */
function positive(what: string, unit: string) {
  const say = `Enter the ${what} in ${unit}, a number more than 0.`;
  return z.number({ error: say }).positive(say);
}

/** A least–most pair; the most may not be below the least (the problem points at `max`). */
function range(what: string, unit: string) {
  return z
    .object(
      {
        min: positive(`least ${what}`, unit),
        max: positive(`most ${what}`, unit),
      },
      { error: `Give the least and the most ${what} in ${unit}.` },
    )
    // Judged only once both are proper figures, so a bad figure is not reported twice.
    .refine((r) => !(r.min > 0 && r.max > 0) || r.min <= r.max, { path: ['max'], message: `The most ${what} cannot be less than the least.` });
}

export const speedStepSchema = z.object(
  {
    label: z.string({ error: 'Name this speed step.' }).trim().min(1, 'Name this speed step.').max(40, 'Keep the name under 40 characters.'),
    driverMm: positive('driver pulley diameter', 'mm'),
    drivenMm: positive('driven pulley diameter', 'mm'),
  },
  { error: 'A speed step has a name and two pulley diameters.' },
);

/** The figures of a horizontal metal-cutting bandsaw. */
export const horizontalBandsawSpecSchema = z.strictObject(
  {
    wheelDiameterMm: positive('wheel diameter', 'mm'),
    centreDistanceMm: positive('distance between the wheel centres', 'mm'),
    bladeLengthMm: positive('blade length', 'mm'),
    bladeWidthMm: positive('blade width', 'mm'),
    bladeThicknessMm: positive('blade thickness', 'mm'),
    tensionRangeKgf: range('tension', 'kgf'),
    tensionReads: z.enum(TENSION_READS, { error: 'Say what the tension gauge reads: the load on the wheel or one strand.' }),
    guideClearanceMm: range('guide clearance', 'mm'),
    motorRpm: positive('motor speed', 'rpm'),
    gearboxRatio: positive('gearbox ratio', 'to 1'),
    speedSteps: z
      .array(speedStepSchema, { error: 'List the speed steps.' })
      .min(1, 'List at least one speed step.')
      .max(12, 'List at most 12 speed steps.'),
    beltCentreDistanceMm: positive('distance between the pulley centres', 'mm'),
    beltDeflectionMm: positive('belt deflection', 'mm'),
  },
  {
    error: (issue) =>
      issue.code === 'unrecognized_keys'
        ? `A horizontal bandsaw’s specification has no ${issue.keys.map((k) => `"${k}"`).join(', ')}. Remove ${issue.keys.length === 1 ? 'it' : 'them'}.`
        : 'Give the machine’s specification.',
  },
);
export type HorizontalBandsawSpec = z.infer<typeof horizontalBandsawSpecSchema>;

/** The specification schema of each machine kind. */
export const MACHINE_SPEC_SCHEMAS: Record<MachineKind, z.ZodType> = {
  horizontal_bandsaw: horizontalBandsawSpecSchema,
};

/** Every problem with a specification for this kind, as '#/spec/…' pointers (empty when it is sound). */
export function specProblems(kind: string, spec: unknown): { pointer: string; detail: string }[] {
  const schema = (MACHINE_SPEC_SCHEMAS as Record<string, z.ZodType | undefined>)[kind];
  if (!schema) return [{ pointer: '#/kind', detail: 'Choose a machine kind Setwright knows.' }];
  const parsed = schema.safeParse(spec);
  if (parsed.success) return [];
  return parsed.error.issues.map((i) => ({
    pointer: '#/' + ['spec', ...i.path].map((p) => String(p).replace(/~/g, '~0').replace(/\//g, '~1')).join('/'),
    detail: i.message,
  }));
}
