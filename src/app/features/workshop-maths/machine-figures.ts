import type { MachineSummary } from '@setwright/contracts/machines';
import type { GaugeReads } from '@setwright/maths';

/** One position of a machine's speed change, as its specification gives it (pulley diameters in mm). */
export interface MachineStep {
  readonly label: string;
  readonly driverMm: number;
  readonly drivenMm: number;
}

/** The figures of a machine that Workshop maths can fill in; any the register lacks are left out. */
export interface MachineFigures {
  readonly id: string;
  readonly name: string;
  readonly assetTag: string;
  readonly wheelDiameterMm?: number;
  readonly centreDistanceMm?: number;
  readonly bladeLengthMm?: number;
  readonly bladeWidthMm?: number;
  readonly bladeThicknessMm?: number;
  readonly tensionRangeKgf?: { readonly min: number; readonly max: number };
  readonly tensionReads?: GaugeReads;
  readonly motorRpm?: number;
  readonly gearboxRatio?: number;
  readonly speedSteps: readonly MachineStep[];
  readonly beltCentreDistanceMm?: number;
  readonly beltDeflectionMm?: number;
}

const num = (x: unknown): number | undefined => (typeof x === 'number' && Number.isFinite(x) ? x : undefined);

function range(x: unknown): { min: number; max: number } | undefined {
  const r = x as { min?: unknown; max?: unknown } | null;
  const min = num(r?.min);
  const max = num(r?.max);
  return typeof r === 'object' && min !== undefined && max !== undefined ? { min, max } : undefined;
}

function steps(x: unknown): MachineStep[] {
  if (!Array.isArray(x)) return [];
  return x.flatMap((s: { label?: unknown; driverMm?: unknown; drivenMm?: unknown } | null, i) => {
    const driverMm = num(s?.driverMm);
    const drivenMm = num(s?.drivenMm);
    if (driverMm === undefined || drivenMm === undefined) return [];
    return [{ label: typeof s?.label === 'string' && s.label !== '' ? s.label : `${i + 1}`, driverMm, drivenMm }];
  });
}

/** Reads a register entry's specification, keeping only figures of the right shape. */
export function machineFigures(m: MachineSummary): MachineFigures {
  const s = m.spec;
  const reads = s['tensionReads'];
  return {
    id: m.id,
    name: m.name,
    assetTag: m.assetTag,
    wheelDiameterMm: num(s['wheelDiameterMm']),
    centreDistanceMm: num(s['centreDistanceMm']),
    bladeLengthMm: num(s['bladeLengthMm']),
    bladeWidthMm: num(s['bladeWidthMm']),
    bladeThicknessMm: num(s['bladeThicknessMm']),
    tensionRangeKgf: range(s['tensionRangeKgf']),
    tensionReads: reads === 'wheel_load' ? 'wheel-load' : reads === 'strand' ? 'strand' : undefined,
    motorRpm: num(s['motorRpm']),
    gearboxRatio: num(s['gearboxRatio']),
    speedSteps: steps(s['speedSteps']),
    beltCentreDistanceMm: num(s['beltCentreDistanceMm']),
    beltDeflectionMm: num(s['beltDeflectionMm']),
  };
}
