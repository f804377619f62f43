import { sources, type Source } from './sources';
import { positiveSi, si, siValue, type Quantity } from './units';
import { oneOf } from './validate';

/** One row of a deflection-force table: force to deflect the belt by the target at mid-span. */
export interface BeltForceRow {
  readonly sections: readonly string[];
  readonly smallPulley: { readonly min: Quantity; readonly max: Quantity };
  readonly speed: { readonly min: Quantity; readonly max: Quantity };
  readonly newBelt: Quantity;
  readonly usedBelt: Quantity;
  readonly source: Source;
}

/** The two published rows we hold (belt maker's installation guide, table 5). */
export const beltForceTable: readonly BeltForceRow[] = [
  {
    sections: ['A', 'AX'],
    smallPulley: { min: { value: 3.0, unit: 'in' }, max: { value: 3.6, unit: 'in' } },
    speed: { min: { value: 1000, unit: 'rpm' }, max: { value: 2500, unit: 'rpm' } },
    newBelt: { value: 5.5, unit: 'lbf' },
    usedBelt: { value: 3.7, unit: 'lbf' },
    source: sources.beltForceTable,
  },
  {
    sections: ['B', 'BX'],
    smallPulley: { min: { value: 4.4, unit: 'in' }, max: { value: 5.6, unit: 'in' } },
    speed: { min: { value: 860, unit: 'rpm' }, max: { value: 2500, unit: 'rpm' } },
    newBelt: { value: 7.9, unit: 'lbf' },
    usedBelt: { value: 5.3, unit: 'lbf' },
    source: sources.beltForceTable,
  },
];

/** Deflection force (N) by belt section, small pulley Ø and speed; null when no row covers them. */
export function beltDeflectionForce(input: {
  section: string;
  smallPulley: Quantity;
  smallPulleySpeed: Quantity;
  belt: 'new' | 'used';
  table?: readonly BeltForceRow[];
}): { force: Quantity; row: BeltForceRow } | null {
  const d = positiveSi(input.smallPulley, 'length', 'smallPulley');
  const n = positiveSi(input.smallPulleySpeed, 'rotationalSpeed', 'smallPulleySpeed');
  const belt = oneOf(input.belt, ['new', 'used'] as const, 'belt');
  const section = String(input.section).trim().toUpperCase();
  type Range = { min: Quantity; max: Quantity };
  const inRange = (x: number, r: Range, kind: 'length' | 'rotationalSpeed'): boolean =>
    x >= siValue(r.min, kind, 'table') - 1e-12 && x <= siValue(r.max, kind, 'table') + 1e-12;
  const row = (input.table ?? beltForceTable).find(
    (r) =>
      r.sections.includes(section) &&
      inRange(d, r.smallPulley, 'length') &&
      inRange(n, r.speed, 'rotationalSpeed'),
  );
  if (row === undefined) return null;
  const force = siValue(belt === 'new' ? row.newBelt : row.usedBelt, 'force', 'table');
  return { force: si(force, 'force'), row };
}
