import {
  defaultBladeSpeedTable,
  type BladeSpeedRow,
  type BladeType,
  type Cutting,
  type SectionPoint,
  type SpeedAdjustments,
} from './blade-speed-table';
import { MathsInputError } from './errors';
import { positiveSi, type Quantity } from './units';
import { requireList } from './validate';

/** A workshop's own speeds: added in front of the default table, or replacing it. */
export interface WorkshopSpeedTable {
  readonly mode?: 'extend' | 'replace';
  readonly rows: readonly BladeSpeedRow[];
  /** Replaces the default adjustment rules one by one; the rest stay (in both modes). */
  readonly adjustments?: Partial<SpeedAdjustments>;
}

const quote = (q: Quantity): string => `${q.value} ${q.unit}`;

/** Section-size change in %, interpolated in a straight line between listed sizes, held at the ends. */
export function sectionSizePercent(section: number, points: readonly SectionPoint[]): number {
  const pts = points
    .map((p, i) => ({
      at: positiveSi(p.section, 'length', `sectionSize.points[${i}].section`),
      pct: p.percent,
    }))
    .sort((a, b) => a.at - b.at);
  const first = pts[0];
  const last = pts[pts.length - 1];
  if (first === undefined || last === undefined) return 0;
  if (section <= first.at) return first.pct;
  for (let i = 1; i < pts.length; i++) {
    const a = pts[i - 1];
    const b = pts[i];
    if (a !== undefined && b !== undefined && section <= b.at) {
      return a.pct + ((b.pct - a.pct) * (section - a.at)) / (b.at - a.at);
    }
  }
  return last.pct;
}

/** The row's speed for the section: the band it falls in (upper edges inclusive), or the reference speed. */
export function rowSpeed(
  row: BladeSpeedRow,
  section: number,
  path: string,
): { speed: Quantity; label: string } {
  if (row.kind === 'reference') {
    positiveSi(row.speed, 'speed', `${path}.speed`);
    return { speed: row.speed, label: `${quote(row.section)} section` };
  }
  const bands = requireList(row.bands, `${path}.bands`) as typeof row.bands;
  let previous: Quantity | undefined;
  for (const [i, band] of bands.entries()) {
    positiveSi(band.speed, 'speed', `${path}.bands[${i}].speed`);
    const fits =
      band.upTo === undefined ||
      section <= positiveSi(band.upTo, 'length', `${path}.bands[${i}].upTo`);
    if (fits || i === bands.length - 1) {
      const from = previous === undefined ? 'sections' : `sections over ${quote(previous)}`;
      const label = band.upTo === undefined ? from : `${from} up to ${quote(band.upTo)}`;
      const shown = fits ? label : `${label} (largest band; section is bigger)`;
      return { speed: band.speed, label: shown };
    }
    previous = band.upTo;
  }
  throw new MathsInputError(`${path}.bands`, `${path}.bands must list at least one entry`, 'missing');
}

/** Picks the row for a material: workshop rows first, then the one whose basis differs least. */
export function pickRow(
  material: string,
  blade: BladeType,
  cutting: Cutting,
  workshop: WorkshopSpeedTable | undefined,
): { row: BladeSpeedRow; origin: 'default' | 'workshop'; path: string } {
  const mismatch = (r: BladeSpeedRow): number =>
    (r.cutting === cutting ? 0 : 1) + (r.blade === blade ? 0 : 1);
  const best = (rows: readonly BladeSpeedRow[], prefix: string) =>
    rows
      .map((row, i) => ({ row, path: `${prefix}[${i}]` }))
      .filter(({ row }) => typeof row === 'object' && row !== null && row.material === material)
      .sort((a, b) => mismatch(a.row) - mismatch(b.row))[0];
  if (workshop !== undefined) {
    const own = best(workshop.rows, 'table.rows');
    if (own !== undefined) return { ...own, origin: 'workshop' };
  }
  if (workshop?.mode !== 'replace') {
    const fallback = best(defaultBladeSpeedTable.rows, 'defaultRows');
    if (fallback !== undefined) return { ...fallback, origin: 'default' };
  }
  throw new MathsInputError(
    'material',
    `material "${material}" is not in the blade speed table`,
    'unknown-name',
  );
}
