import {
  defaultBladeSpeedTable,
  type BladeSpeedRow,
  type BladeType,
  type Cutting,
  type SpeedAdjustments,
} from './blade-speed-table';
import { pickRow, rowSpeed, sectionSizePercent, type WorkshopSpeedTable } from './blade-speed-rows';
import { MathsInputError } from './errors';
import type { Source } from './sources';
import { positiveSi, si, siValue, type Quantity } from './units';
import { oneOf, requireObject } from './validate';

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

/** "+15 %", "-50 to -30 %": one decimal only where needed. */
function percentText(low: number, high: number): string {
  const one = (p: number): string => `${p > 0 ? '+' : ''}${Number.isInteger(p) ? p : p.toFixed(1)}`;
  return low === high ? `${one(low)} %` : `${one(low)} to ${one(high)} %`;
}

/** Adjustments the request needs from this row's basis, and notes where none could be applied. */
function adjustmentsFor(
  row: BladeSpeedRow,
  section: number,
  blade: BladeType,
  cutting: Cutting,
  rules: SpeedAdjustments,
  path: string,
): { adjustments: AppliedAdjustment[]; notes: string[] } {
  const adjustments: AppliedAdjustment[] = [];
  const notes: string[] = [];
  if (row.kind === 'reference') {
    const reference = positiveSi(row.section, 'length', `${path}.section`);
    const { points, source } = rules.sectionSize;
    const atSection = 1 + sectionSizePercent(section, points) / 100;
    const atReference = 1 + sectionSizePercent(reference, points) / 100;
    const pct = (atSection / atReference - 1) * 100;
    if (Math.abs(pct) > 1e-9) {
      adjustments.push({ name: 'section size', percentLow: pct, percentHigh: pct, source });
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
  return { adjustments, notes };
}

/** Starting speed v = v_table × (1 + size %) × dry (0.5–0.7) × carbon (0.5), each only where the row's basis differs; speed = middle of low–high. */
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
    if (!Array.isArray(t['rows'])) {
      throw new MathsInputError('table.rows', 'table.rows must be a list', 'missing');
    }
    if (t['mode'] !== undefined) oneOf(t['mode'], ['extend', 'replace'] as const, 'table.mode');
  }
  const rules = { ...defaultBladeSpeedTable.adjustments, ...input.table?.adjustments };
  const { row, origin, path } = pickRow(input.material, blade, cutting, input.table);
  const { speed: tableSpeed, label } = rowSpeed(row, section, path);
  const { adjustments, notes } = adjustmentsFor(row, section, blade, cutting, rules, path);

  const base = siValue(tableSpeed, 'speed', `${path}.speed`);
  const low = adjustments.reduce((v, a) => v * (1 + a.percentLow / 100), base);
  const high = adjustments.reduce((v, a) => v * (1 + a.percentHigh / 100), base);
  const bladeText = row.blade === 'unstated' ? 'blade type not stated' : `${row.blade} blade`;
  const rowText = `${row.name}, ${label}, ${row.cutting}, ${bladeText}`;
  const adjText =
    adjustments.length === 0
      ? 'no adjustments'
      : adjustments.map((a) => `${a.name} ${percentText(a.percentLow, a.percentHigh)}`).join('; ');
  const sourceText =
    row.source.section === undefined ? row.source.title : `${row.source.title} (${row.source.section})`;
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
      summary: `${sourceText}: ${rowText}, ${tableSpeed.value} ${tableSpeed.unit}; ${adjText}.`,
    },
  };
}
