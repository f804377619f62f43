import { steelModulus, type BladeSteel } from './blade-steel';
import { MathsInputError } from './errors';
import { inUnits, positiveSi, si, siValue, type Quantity } from './units';
import { oneOf, requirePositive } from './validate';

/** What a tension gauge reads: the load on the wheel (shared by two strands) or one strand's tension. */
export type GaugeReads = 'wheel-load' | 'strand';

const forceUnits = ['N', 'kgf', 'lbf'] as const;
const stressUnits = ['MPa', 'psi'] as const;
export type ForceReadout = Record<(typeof forceUnits)[number], number>;
export type StressReadout = Record<(typeof stressUnits)[number], number>;

/** Blade section A = w·t (m²). */
export function bladeSection(input: { width: Quantity; thickness: Quantity }): Quantity {
  const w = positiveSi(input.width, 'length', 'width');
  const t = positiveSi(input.thickness, 'length', 'thickness');
  return si(w * t, 'area');
}

/** Strand tension from a gauge reading: strand = reading (strand gauge) or reading ÷ 2 (wheel load). */
export function strandTension(input: { reading: Quantity; reads: GaugeReads }): Quantity {
  const reads = oneOf(input.reads, ['wheel-load', 'strand'] as const, 'reads');
  const f = positiveSi(input.reading, 'force', 'reading');
  return si(reads === 'wheel-load' ? f / 2 : f, 'force');
}

/** Gauge reading for a strand tension: reading = strand (strand gauge) or 2 × strand (wheel load). */
export function gaugeReadingFor(input: { strandForce: Quantity; reads: GaugeReads }): Quantity {
  const reads = oneOf(input.reads, ['wheel-load', 'strand'] as const, 'reads');
  const f = positiveSi(input.strandForce, 'force', 'strandForce');
  return si(reads === 'wheel-load' ? 2 * f : f, 'force');
}

export interface BladeStress {
  /** σ in Pa. */
  readonly stress: Quantity;
  readonly strandForce: Quantity;
  readonly section: Quantity;
  readonly stressReadout: StressReadout;
  readonly forceReadout: ForceReadout;
}

/** Stress in one strand σ = F_strand ÷ (w·t); F_strand = reading, or reading ÷ 2 for a wheel load. */
export function bladeStress(input: {
  force: Quantity;
  reads: GaugeReads;
  width: Quantity;
  thickness: Quantity;
}): BladeStress {
  const reads = oneOf(input.reads, ['wheel-load', 'strand'] as const, 'reads');
  const f = positiveSi(input.force, 'force', 'force');
  const strand = si(reads === 'wheel-load' ? f / 2 : f, 'force');
  const area = bladeSection(input);
  const stress = si(strand.value / area.value, 'stress');
  return {
    stress,
    strandForce: strand,
    section: area,
    stressReadout: inUnits(stress, stressUnits),
    forceReadout: inUnits(strand, forceUnits),
  };
}

export interface TensionForce {
  readonly strandForce: Quantity;
  readonly wheelLoad: Quantity;
  readonly strandReadout: ForceReadout;
  readonly wheelLoadReadout: ForceReadout;
}

/** Force for a target stress F_strand = σ·w·t; wheel load = 2·F_strand. */
export function forceForStress(input: {
  stress: Quantity;
  width: Quantity;
  thickness: Quantity;
}): TensionForce {
  const sigma = positiveSi(input.stress, 'stress', 'stress');
  const strand = si(sigma * bladeSection(input).value, 'force');
  const wheel = si(2 * strand.value, 'force');
  return {
    strandForce: strand,
    wheelLoad: wheel,
    strandReadout: inUnits(strand, forceUnits),
    wheelLoadReadout: inUnits(wheel, forceUnits),
  };
}

/** E from a named steel or a given modulus (Pa). */
function modulusOf(steel: unknown, modulus: unknown): number {
  if (modulus !== undefined) return positiveSi(modulus, 'stress', 'modulus');
  const name = oneOf(steel, Object.keys(steelModulus) as BladeSteel[], 'steel');
  return siValue(steelModulus[name].modulus, 'stress', 'steel');
}

export interface StretchStress {
  readonly stress: Quantity;
  readonly strain: number;
  readonly modulus: Quantity;
  readonly stressReadout: StressReadout;
}

/** Stress from a stretch gauge σ = E·ΔL ÷ L₀ (E from steel name or given). */
export function stressFromStretch(input: {
  elongation: Quantity;
  gaugeLength: Quantity;
  steel?: BladeSteel;
  modulus?: Quantity;
}): StretchStress {
  const dl = positiveSi(input.elongation, 'length', 'elongation');
  const l0 = positiveSi(input.gaugeLength, 'length', 'gaugeLength');
  if (dl >= l0) {
    throw new MathsInputError(
      'elongation',
      'elongation must be smaller than gaugeLength',
      'out-of-range',
    );
  }
  const e = modulusOf(input.steel, input.modulus);
  const stress = si((e * dl) / l0, 'stress');
  return {
    stress,
    strain: dl / l0,
    modulus: si(e, 'stress'),
    stressReadout: inUnits(stress, stressUnits),
  };
}

/** Stretch a gauge should show for a target stress ΔL = σ·L₀ ÷ E. */
export function stretchForStress(input: {
  stress: Quantity;
  gaugeLength: Quantity;
  steel?: BladeSteel;
  modulus?: Quantity;
}): Quantity {
  const sigma = positiveSi(input.stress, 'stress', 'stress');
  const l0 = positiveSi(input.gaugeLength, 'length', 'gaugeLength');
  const e = modulusOf(input.steel, input.modulus);
  return si(requirePositive((sigma * l0) / e, 'elongation'), 'length');
}
