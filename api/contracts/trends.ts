import type { RecordStatus } from './records';

/**
 * The drift rule, stated on screen as well as applied on the server: a straight line fitted by least
 * squares through the last `readings` readings (one per check, evenly spaced) is carried on for `ahead`
 * more checks; if it then passes a limit while the latest reading is still within it, the reading is
 * drifting toward that limit.
 */
export const DRIFT_RULE = { readings: 5, ahead: 3 } as const;

export const DRIFT_RULE_TEXT =
  `Drift rule: a straight line fitted (least squares) through the last ${DRIFT_RULE.readings} readings, ` +
  `carried on for ${DRIFT_RULE.ahead} more checks. A notice shows when that line passes a limit while the latest reading is still within it.`;

/** One stored reading: the latest attempt of its step in one record, as the server judged it. */
export interface TrendPoint {
  recordId: string;
  /** When the reading was saved. */
  at: string;
  value: number;
  unit: string | null;
  outOfLimits: boolean;
  recordStatus: RecordStatus;
}

export interface TrendLimits {
  min: number | null;
  max: number | null;
  unit: string | null;
}

export interface TrendDrift {
  /** The limit the fitted line passes. */
  toward: 'min' | 'max';
  limit: number;
  /** Change per check along the fitted line, in the reading's unit. */
  slopePerCheck: number;
  /** Where the line stands after DRIFT_RULE.ahead more checks. */
  projected: number;
  /** How many more checks until the line reaches the limit (1 … DRIFT_RULE.ahead). */
  checksToLimit: number;
}

/** One reading over time on one machine: a number input or a computed figure of a procedure step. */
export interface TrendSeries {
  /** procedureKey/stepId/valueId */
  key: string;
  procedureKey: string;
  procedureTitle: string;
  stepId: string;
  stepTitle: string;
  valueId: string;
  label: string;
  unit: string | null;
  /** An input is shown as it was entered; a computed figure to this many decimals. */
  kind: 'input' | 'computed';
  decimals: number;
  /** The limits in force now: the approved procedure version against the machine's current specification. */
  limits: TrendLimits | null;
  /** Oldest first. */
  points: TrendPoint[];
  drift: TrendDrift | null;
}

export interface MachineTrends {
  machineId: string;
  rule: typeof DRIFT_RULE;
  series: TrendSeries[];
}
