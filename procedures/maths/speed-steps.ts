import { gearboxRatioOf, wheelSurfaceSpeed } from './speed';
import { positiveSi, si, type Quantity } from './units';
import { requireList, requireObject } from './validate';

/** One position of the machine's speed change: which pulley steps the belt runs on. */
export interface SpeedStep {
  readonly label: string;
  readonly driverPulley: Quantity;
  readonly drivenPulley: Quantity;
  /** Overrides the table's gearbox ratio for this step (e.g. a high/low gear). */
  readonly gearboxRatio?: number;
}

/** A machine's pulley/gear table. */
export interface SpeedTable {
  readonly motorSpeed: Quantity;
  readonly wheelDiameter: Quantity;
  readonly gearboxRatio?: number;
  readonly steps: readonly SpeedStep[];
}

/** A step with the wheel and blade speeds it gives (SI). */
export interface SpeedStepResult {
  readonly index: number;
  readonly label: string;
  readonly wheelSpeed: Quantity;
  readonly surfaceSpeed: Quantity;
}

/** Blade speed of every step, v = π·D·n_motor·(driver ÷ driven) ÷ ratio, in table order. */
export function speedSteps(table: SpeedTable): SpeedStepResult[] {
  const t = requireObject(table, 'table');
  const steps = requireList(t['steps'], 'steps');
  const tableRatio = gearboxRatioOf(table.gearboxRatio);
  return steps.map((raw, index) => {
    const step = requireObject(raw, `steps[${index}]`) as unknown as SpeedStep;
    const named = typeof step.label === 'string' && step.label !== '';
    const label = named ? step.label : `step ${index + 1}`;
    const ratio =
      step.gearboxRatio === undefined
        ? tableRatio
        : gearboxRatioOf(step.gearboxRatio, `steps[${index}].gearboxRatio`);
    positiveSi(step.driverPulley, 'length', `steps[${index}].driverPulley`);
    positiveSi(step.drivenPulley, 'length', `steps[${index}].drivenPulley`);
    const speeds = wheelSurfaceSpeed({
      motorSpeed: table.motorSpeed,
      wheelDiameter: table.wheelDiameter,
      driverPulley: step.driverPulley,
      drivenPulley: step.drivenPulley,
      gearboxRatio: ratio,
    });
    return { index, label, ...speeds };
  });
}

/** The chosen step and how far it is from the recommendation. */
export interface NearestStep {
  readonly step: SpeedStepResult;
  /** v_step − v_recommended, in m/s. */
  readonly difference: Quantity;
  /** (v_step − v_recommended) ÷ v_recommended × 100. */
  readonly differencePercent: number;
  /** 'nearest'; or with notFaster, 'fastest-not-over', or 'slowest' when every step is too fast. */
  readonly rule: 'nearest' | 'fastest-not-over' | 'slowest';
}

/** Step nearest a recommended speed; difference % = (v_step − v_rec) ÷ v_rec × 100. */
export function nearestSpeedStep(input: {
  table: SpeedTable;
  recommended: Quantity;
  /** Prefer the fastest step not above the recommendation (kinder to the blade). */
  notFaster?: boolean;
}): NearestStep {
  const target = positiveSi(input.recommended, 'speed', 'recommended');
  const steps = speedSteps(input.table);
  let chosen: SpeedStepResult;
  let rule: NearestStep['rule'] = 'nearest';
  if (input.notFaster === true) {
    const notOver = steps.filter((s) => s.surfaceSpeed.value <= target);
    if (notOver.length > 0) {
      chosen = notOver.reduce((a, b) => (b.surfaceSpeed.value > a.surfaceSpeed.value ? b : a));
      rule = 'fastest-not-over';
    } else {
      chosen = steps.reduce((a, b) => (b.surfaceSpeed.value < a.surfaceSpeed.value ? b : a));
      rule = 'slowest';
    }
  } else {
    chosen = steps.reduce((a, b) =>
      Math.abs(b.surfaceSpeed.value - target) < Math.abs(a.surfaceSpeed.value - target) ? b : a,
    );
  }
  const diff = chosen.surfaceSpeed.value - target;
  return {
    step: chosen,
    difference: si(diff, 'speed'),
    differencePercent: (diff / target) * 100,
    rule,
  };
}
