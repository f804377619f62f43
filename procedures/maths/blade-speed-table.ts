import { sources, type Source } from './sources';
import type { Quantity } from './units';

export type BladeType = 'bi-metal' | 'carbon';
export type Cutting = 'coolant' | 'dry';

/** Speed for sections up to `upTo` (inclusive); the last band has no upper bound. */
export interface SpeedBand {
  readonly upTo?: Quantity;
  readonly speed: Quantity;
}

/** One material's starting speed, as its source gives it. */
export type BladeSpeedRow = {
  readonly material: string;
  readonly name: string;
  readonly source: Source;
  readonly cutting: Cutting;
  readonly blade: BladeType | 'unstated';
} & (
  | { readonly kind: 'bands'; readonly bands: readonly SpeedBand[] }
  | { readonly kind: 'reference'; readonly section: Quantity; readonly speed: Quantity }
);

/** Percentage change to a reference-section speed for another section size. */
export interface SectionPoint {
  readonly section: Quantity;
  readonly percent: number;
}

/** The published adjustment rules applied when a row's basis differs from the request. */
export interface SpeedAdjustments {
  readonly dryCutting: {
    readonly minPercent: number;
    readonly maxPercent: number;
    readonly source: Source;
  };
  readonly carbonBlade: { readonly percent: number; readonly source: Source };
  readonly sectionSize: { readonly points: readonly SectionPoint[]; readonly source: Source };
}

export interface BladeSpeedTable {
  readonly rows: readonly BladeSpeedRow[];
  readonly adjustments: SpeedAdjustments;
}

const ftMin = (value: number): Quantity => ({ value, unit: 'ft/min' });
const inch = (value: number): Quantity => ({ value, unit: 'in' });

/** Dry-chart row: ft/min for sections 0–½ in, ½–1 in, over 1 in. */
function dryChartRow(
  material: string,
  name: string,
  small: number,
  mid: number,
  large: number,
): BladeSpeedRow {
  return {
    material,
    name,
    source: sources.benchSawDryChart,
    cutting: 'dry',
    blade: 'unstated',
    kind: 'bands',
    bands: [
      { upTo: inch(0.5), speed: ftMin(small) },
      { upTo: inch(1), speed: ftMin(mid) },
      { speed: ftMin(large) },
    ],
  };
}

/** Default table: one worked handbook row (with coolant, bi-metal, 4 in) and the dry-cutting chart. */
export const defaultBladeSpeedTable: BladeSpeedTable = {
  rows: [
    {
      material: 'stainless-304',
      name: '304 stainless steel',
      source: sources.handbookBimetal,
      cutting: 'coolant',
      blade: 'bi-metal',
      kind: 'reference',
      section: inch(4),
      speed: ftMin(120),
    },
    dryChartRow('low-carbon-steel', 'low-carbon steel', 90, 125, 160),
    dryChartRow('medium-carbon-steel', 'medium-carbon steel', 75, 100, 125),
    dryChartRow('tool-steel', 'tool (high-speed) steel', 35, 50, 65),
    dryChartRow('cast-iron', 'cast iron', 90, 125, 160),
    dryChartRow('aluminium', 'aluminium', 185, 250, 315),
    dryChartRow('brass-soft', 'soft brass', 375, 500, 625),
    dryChartRow('brass-hard-bronze', 'hard brass and bronze', 150, 200, 250),
    dryChartRow('copper', 'copper', 185, 250, 315),
  ],
  adjustments: {
    dryCutting: { minPercent: 30, maxPercent: 50, source: sources.handbookBimetal },
    carbonBlade: { percent: 50, source: sources.handbookBimetal },
    sectionSize: {
      source: sources.handbookBimetal,
      points: [
        { section: inch(0.25), percent: 15 },
        { section: inch(0.75), percent: 12 },
        { section: inch(1.25), percent: 10 },
        { section: inch(4), percent: 0 },
        { section: inch(8), percent: -12 },
      ],
    },
  },
};
