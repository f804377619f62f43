import {
  defaultBladeSpeedTable,
  type BladeSpeedRow,
  type BladeType,
  type Cutting,
  type SectionPoint,
  type SpeedAdjustments,
} from './blade-speed-table';
import { MathsInputError } from './errors';
import type { Source } from './sources';
import { positiveSi, si, siValue, type Quantity } from './units';
import { oneOf, requireList, requireObject } from './validate';

/** A workshop's own speeds: added in front of the default table, or replacing it. */
export interface WorkshopSpeedTable {
  readonly mode?: 'extend' | 'replace';
  readonly rows: readonly BladeSpeedRow[];
  readonly adjustments?: Partial<SpeedAdjustments>;
}

/** One adjustment applied to the table speed, as a percentage change range. */
export interface AppliedAdjustment {
  readonly name: string;
  readonly percentLow: number;
  readonly percentHigh: number;
  readonly source: Source;
}

/** Where a recommendation came from, to show and to store with the record. */
export interface BladeSpeedBasis {
  readonly origin: 'default' | 'workshop';
  readonly material: string;
  readonly materialName: string;
  readonly source: Source;
  readonly row: string;
  readonly tableSpeed: Quantity;
  readonly adjustments: readonly AppliedAdjustment[];
  readonly notes: readonly string[];
  readonly summary: string;
}

/** A starting speed range (SI, m/s) with its middle and its basis. */
export interface BladeSpeedRecommendation {
  readonly speed: Quantity;
  readonly low: Quantity;
  readonly high: Quantity;
  readonly basis: BladeSpeedBasis;
}

const quote = (q: Quantity): string => `${q.value} ${q.unit}`;

/** Section-size change in % by straight-line interpolation between the listed sizes, held at the ends. */
export function sectionSizePercent(section: number, points: readonly SectionPoint[]): number {
  const pts = points
    .map((p, i) => ({ at: positiveSi(p.section, 'length', `sectionSize.points[${i}].section`), pct: p.percent }))
    .sort((a, b) => a.at - b.at);
  const first = pts[0];
  const last = pts[pts.length - 1];
  if (first === undefined || last === undefined) return 0;
  if (section <= first.at) return first.pct;
  if (section >= last.at) return last.pct;
  for (let i = 1; i < pts.length; i++) {
    const a = pts[i - 1];
    const b = pts[i];
    if (a !== undefined && b !== undefined && section <= b.at) {
      return a.pct + ((b.pct - a.pct) * (section - a.at)) / (b.at - a.at);
    }
  }
  return last.pct;
}

/** The row's speed for the section: the band it falls in, or the reference speed. */
function rowSpeed(row: BladeSpeedRow, section: number, path: string): { speed: Quantity; label: string } {
  if (row.kind === 'reference') {
    positiveSi(row.speed, 'speed', `${path}.speed`);
    return { speed: row.speed, label: `${quote(row.section)} section` };
  }
  const bands = requireList(row.bands, `${path}.bands`) as readonly (typeof row.bands)[number][];
  let previous: Quantity | undefined;
  for (const [i, band] of bands.entries()) {
    positiveSi(band.speed, 'speed', `${path}.bands[${i}].speed`);
    const fits = band.upTo === undefined || section <= positiveSi(band.upTo, 'length', `${path}.bands[${i}].upTo`);
    const isLast = i === bands.length - 1;
    if (fits || isLast) {
      const from = previous === undefined ? 'sections' : `sections over ${quote(previous)}`;
      const label = band.upTo === undefined ? from : `${from} up to ${quote(band.upTo)}`;
      return { speed: band.speed, label: fits ? label : `${label} (largest band; section is bigger)` };
    }
    previous = band.upTo;
  }
  throw new MathsInputError(`${path}.bands`, `${path}.bands must list at least one entry`, 'missing');
}

/** Picks the row for a material: workshop rows first, then the fewest basis differences. */
function pickRow(
  material: string,
  blade: BladeType,
  cutting: Cutting,
  workshop: WorkshopSpeedTable | undefined,
): { row: BladeSpeedRow; origin: 'default' | 'workshop'; path: string } {
  const mismatch = (r: BladeSpeedRow): number => (r.cutting === cutting ? 0 : 1) + (r.blade === blade ? 0 : 1);
  const best = (rows: readonly BladeSpeedRow[], prefix: string) =>
    rows
      .map((row, i) => ({ row, path: `${prefix}[${i}]` }))
      .filter(({ row }) => row.material === material)
      .sort((a, b) => mismatch(a.row) - mismatch(b.row))[0];
  if (workshop !== undefined) {
    const own = best(workshop.rows, 'table.rows');
    if (own !== undefined) return { ...own, origin: 'workshop' };
  }
  const fallback = workshop?.mode === 'replace' ? undefined : best(defaultBladeSpeedTable.rows, 'defaultRows');
  if (fallback !== undefined) return { ...fallback, origin: 'default' };
  throw new MathsInputError('material', `material "${material}" is not in the blade speed table`, 'unknown-name');
}

/**
 * Starting blade speed: v = v_table × (1 + size %) × dry factor (0.5–0.7) × carbon factor (0.5),
 * each factor applied only when the row's basis differs from the request; speed is the middle of the range.
 */
export function recommendBladeSpeed(input: {
  material: string;
  section: Quantity;
  blade: BladeType;
  cutting: Cutting;
  table?: WorkshopSpeedTable;
}): BladeSpeedRecommendation {
  if (typeof input.material !== 'string' || input.material === '') {
    throw new MathsInputError('material', 'material is required', 'missing');
  }
  const section = positiveSi(input.section, 'length', 'section');
  const blade = oneOf(input.blade, ['bi-metal', 'carbon'] as const, 'blade');
  const cutting = oneOf(input.cutting, ['coolant', 'dry'] as const, 'cutting');
  if (input.table !== undefined) {
    const t = requireObject(input.table, 'table');
    if (!Array.isArray(t['rows'])) throw new MathsInputError('table.rows', 'table.rows must be a list', 'missing');
    if (t['mode'] !== undefined) oneOf(t['mode'], ['extend', 'replace'] as const, 'table.mode');
  }
  const rules: SpeedAdjustments = { ...defaultBladeSpeedTable.adjustments, ...input.table?.adjustments };
  const { row, origin, path } = pickRow(input.material, blade, cutting, input.table);
  const { speed: tableSpeed, label } = rowSpeed(row, section, path);
  const adjustments: AppliedAdjustment[] = [];
  const notes: string[] = [];

  if (row.kind === 'reference') {
    const reference = positiveSi(row.section, 'length', `${path}.section`);
    const points = rules.sectionSize.points;
    const atSection = 1 + sectionSizePercent(section, points) / 100;
    const atReference = 1 + sectionSizePercent(reference, points) / 100;
    const pct = (atSection / atReference - 1) * 100;
    if (Math.abs(pct) > 1e-9) {
      adjustments.push({ name: 'section size', percentLow: pct, percentHigh: pct, source: rules.sectionSize.source });
    }
  }
  if (row.cutting === 'coolant' && cutting === 'dry') {
    const { minPercent, maxPercent, source } = rules.dryCutting;
    adjustments.push({ name: 'cutting dry', percentLow: -maxPercent, percentHigh: -minPercent, source });
  } else if (row.cutting === 'dry' && cutting === 'coolant') {
    notes.push('Source speeds are for dry cutting; kept as they are with coolant (no published increase).');
  }
  if (row.blade === 'bi-metal' && blade === 'carbon') {
    const { percent, source } = rules.carbonBlade;
    adjustments.push({ name: 'carbon-steel blade', percentLow: -percent, percentHigh: -percent, source });
  } else if (row.blade === 'carbon' && blade === 'bi-metal') {
    notes.push('Source speeds are for carbon blades; kept as they are for bi-metal (no published increase).');
  } else if (row.blade === 'unstated') {
    notes.push('Source does not say which blade type; no blade adjustment applied.');
  }

  const base = siValue(tableSpeed, 'speed', `${path}.speed`);
  const low = adjustments.reduce((v, a) => v * (1 + a.percentLow / 100), base);
  const high = adjustments.reduce((v, a) => v * (1 + a.percentHigh / 100), base);
  const rowText = `${row.name}, ${label}, ${row.cutting}, ${row.blade === 'unstated' ? 'blade type not stated' : `${row.blade} blade`}`;
  const adjText = adjustments.length === 0
    ? 'no adjustments'
    : adjustments.map((a) => `${a.name} ${a.percentLow === a.percentHigh ? a.percentLow.toFixed(1) : `${a.percentLow} to ${a.percentHigh}`} %`).join('; ');
  return {
    speed: si((low + high) / 2, 'speed'),
    low: si(low, 'speed'),
    high: si(high, 'speed'),
    basis: {
      origin,
      material: row.material,
      materialName: row.name,
      source: row.source,
      row: rowText,
      tableSpeed,
      adjustments,
      notes,
      summary: `${row.source.title}${row.source.section === undefined ? '' : ` (${row.source.section})`}: ${rowText}, ${quote(tableSpeed)}; ${adjText}.`,
    },
  };
}
