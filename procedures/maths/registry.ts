import { beltDeflectionForce } from './belt-force';
import { beltDeflectionTarget, beltSpan, openBeltLength, openBeltLengthExact } from './belt';
import { bladeLength, centreDistanceForBlade } from './blade-length';
import { recommendBladeSpeed } from './blade-speed';
import { breakInRemaining, totalCutArea } from './break-in';
import { cutTime, descentRate, descentTime } from './descent';
import { MathsInputError } from './errors';
import { feelerStack } from './feeler';
import { averageWidthOfCut, toothPitch } from './pitch';
import { sectionArea } from './sections';
import { surfaceSpeed, wheelSpeed, wheelSurfaceSpeed } from './speed';
import { nearestSpeedStep, speedSteps } from './speed-steps';
import { allowedGap, squarenessError } from './squareness';
import { judgeBladeStress } from './stress-targets';
import {
  bladeSection,
  bladeStress,
  forceForStress,
  gaugeReadingFor,
  strandTension,
  stressFromStretch,
  stretchForStress,
} from './tension';
import { requireObject } from './validate';

/** A maths function a procedure can name by string; every one takes a single object of named inputs. */
export interface MathsFunctionEntry {
  readonly run: (input: never) => unknown;
  readonly summary: string;
  readonly inputs: string;
  readonly outputs: string;
}

/** Stable names → functions, for procedure files that compute a field by naming a function. */
export const mathsFunctions = {
  wheelSpeed: {
    run: wheelSpeed,
    summary: 'Wheel speed through the belt and gearbox.',
    inputs: 'motorSpeed (rpm), driverPulley, drivenPulley (length), gearboxRatio? (number)',
    outputs: 'rotational speed (Hz)',
  },
  surfaceSpeed: {
    run: surfaceSpeed,
    summary: 'Surface speed of a wheel or belt, v = π·D·n.',
    inputs: 'diameter (length), rotationalSpeed (rpm)',
    outputs: 'speed (m/s)',
  },
  wheelSurfaceSpeed: {
    run: wheelSurfaceSpeed,
    summary: 'Blade speed from motor speed, pulleys, gearbox and wheel diameter.',
    inputs: 'motorSpeed, driverPulley, drivenPulley, gearboxRatio?, wheelDiameter',
    outputs: '{ wheelSpeed (Hz), surfaceSpeed (m/s) }',
  },
  speedSteps: {
    run: speedSteps,
    summary: "Blade speed at every step of the machine's speed table.",
    inputs: 'table: { motorSpeed, wheelDiameter, gearboxRatio?, steps: [{ label, driverPulley, drivenPulley, gearboxRatio? }] }',
    outputs: '[{ index, label, wheelSpeed (Hz), surfaceSpeed (m/s) }]',
  },
  nearestSpeedStep: {
    run: nearestSpeedStep,
    summary: 'Speed step nearest a recommended blade speed, with the % difference.',
    inputs: 'table (as speedSteps), recommended (speed), notFaster? (boolean)',
    outputs: '{ step, difference (m/s), differencePercent, rule }',
  },
  recommendBladeSpeed: {
    run: recommendBladeSpeed,
    summary: 'Starting blade speed for a material from the speed table, with its basis.',
    inputs: "material (key), section (length), blade ('bi-metal' | 'carbon'), cutting ('coolant' | 'dry'), table? (workshop rows)",
    outputs: '{ speed, low, high (m/s), basis: { source, row, adjustments, notes, summary } }',
  },
  averageWidthOfCut: {
    run: averageWidthOfCut,
    summary: 'Width of cut: solid size, or area ÷ travel for tube and structural sections.',
    inputs: "section: { shape: 'solid', size } | { shape: 'tube', outside, inside | wall } | { shape: 'structural', area, travel }",
    outputs: 'length (m)',
  },
  toothPitch: {
    run: toothPitch,
    summary: 'Allowed teeth per inch and the nearest standard constant and variable pitches.',
    inputs: 'section (as averageWidthOfCut), minTeeth? (3), maxTeeth? (12), targetTeeth?, constantPitches?, variablePitches?',
    outputs: '{ widthOfCut, minTpi, maxTpi, targetTpi, constant, variable, allowedConstant, allowedVariable }',
  },
  bladeSection: {
    run: bladeSection,
    summary: 'Blade cross-section, A = w·t.',
    inputs: 'width, thickness (length)',
    outputs: 'area (m²)',
  },
  strandTension: {
    run: strandTension,
    summary: 'Strand tension from a gauge reading (wheel load is shared by two strands).',
    inputs: "reading (force), reads ('wheel-load' | 'strand')",
    outputs: 'force (N)',
  },
  gaugeReadingFor: {
    run: gaugeReadingFor,
    summary: 'Gauge reading that gives a strand tension.',
    inputs: "strandForce (force), reads ('wheel-load' | 'strand')",
    outputs: 'force (N)',
  },
  bladeStress: {
    run: bladeStress,
    summary: 'Stress in one strand from a tension reading and the blade section.',
    inputs: "force (force), reads ('wheel-load' | 'strand'), width, thickness (length)",
    outputs: '{ stress (Pa), strandForce (N), section (m²), stressReadout {MPa, psi}, forceReadout {N, kgf, lbf} }',
  },
  forceForStress: {
    run: forceForStress,
    summary: 'Strand force and wheel load for a target stress.',
    inputs: 'stress, width, thickness',
    outputs: '{ strandForce, wheelLoad (N), strandReadout, wheelLoadReadout {N, kgf, lbf} }',
  },
  stressFromStretch: {
    run: stressFromStretch,
    summary: "Stress from a stretch gauge's elongation over its gauge length, σ = E·ΔL/L₀.",
    inputs: "elongation, gaugeLength (length), steel ('structural' | 'stainless' | 'carbon-steel' | 'tool-steel') or modulus",
    outputs: '{ stress (Pa), strain, modulus (Pa), stressReadout {MPa, psi} }',
  },
  stretchForStress: {
    run: stretchForStress,
    summary: 'Elongation a stretch gauge should show for a target stress, ΔL = σ·L₀/E.',
    inputs: 'stress, gaugeLength, steel or modulus',
    outputs: 'length (m)',
  },
  judgeBladeStress: {
    run: judgeBladeStress,
    summary: 'Strand stress judged against the usual targets for the blade type.',
    inputs: "stress, blade ('carbon' | 'bi-metal')",
    outputs: "{ verdict ('low' | 'within' | 'high' | 'over-limit'), target, limit, source, message }",
  },
  beltSpan: {
    run: beltSpan,
    summary: 'Belt span between tangent points.',
    inputs: 'driverPulley, drivenPulley, centreDistance (length)',
    outputs: 'length (m)',
  },
  openBeltLength: {
    run: openBeltLength,
    summary: 'Open-belt length, usual approximation.',
    inputs: 'driverPulley, drivenPulley, centreDistance',
    outputs: 'length (m)',
  },
  openBeltLengthExact: {
    run: openBeltLengthExact,
    summary: 'Open-belt length, exact tangent form.',
    inputs: 'driverPulley, drivenPulley, centreDistance',
    outputs: 'length (m)',
  },
  beltDeflectionTarget: {
    run: beltDeflectionTarget,
    summary: 'Target mid-span deflection, span/64.',
    inputs: 'span (length)',
    outputs: 'length (m)',
  },
  beltDeflectionForce: {
    run: beltDeflectionForce,
    summary: 'Force to deflect a V-belt by the target, from the belt table.',
    inputs: "section ('A', 'B'…), smallPulley (length), smallPulleySpeed (rpm), belt ('new' | 'used')",
    outputs: '{ force (N), row } or null',
  },
  bladeLength: {
    run: bladeLength,
    summary: 'Blade length on two equal wheels.',
    inputs: 'wheelDiameter, centreDistance (length)',
    outputs: 'length (m)',
  },
  centreDistanceForBlade: {
    run: centreDistanceForBlade,
    summary: 'Wheel centre distance for a blade length.',
    inputs: 'bladeLength, wheelDiameter (length)',
    outputs: 'length (m)',
  },
  squarenessError: {
    run: squarenessError,
    summary: 'Squareness from a feeler gap at the top of a square, with pass/fail.',
    inputs: 'gap, squareHeight (length), tolerance? ({ gap, over } or { angle })',
    outputs: '{ angle (rad), degrees, arcMinutes, degreesMinutes, errorPer100mm (m), slope, pass? }',
  },
  allowedGap: {
    run: allowedGap,
    summary: 'Gap at the top of a square that an angle tolerance allows.',
    inputs: 'squareHeight (length), angle',
    outputs: 'length (m)',
  },
  feelerStack: {
    run: feelerStack,
    summary: 'Fewest feeler leaves that make a gap within a tolerance.',
    inputs: 'target, tolerance (length), leaves? (lengths; default typical metric set)',
    outputs: '{ leaves, indexes, total (m), error (m) } or null',
  },
  descentRate: {
    run: descentRate,
    summary: 'Bow-arm descent rate from a timed drop.',
    inputs: 'distance (length), time',
    outputs: 'speed (m/s)',
  },
  descentTime: {
    run: descentTime,
    summary: 'Time for the bow arm to drop a distance at a descent rate.',
    inputs: 'distance (length), rate (speed)',
    outputs: 'time (s)',
  },
  cutTime: {
    run: cutTime,
    summary: 'Cut time from section area and cutting rate.',
    inputs: 'area, cuttingRate (area per time)',
    outputs: 'time (s)',
  },
  sectionArea: {
    run: sectionArea,
    summary: 'Cut area of a section.',
    inputs: "{ shape: 'round', diameter } | { shape: 'rectangle', width, height } | { shape: 'tube', outside, inside | wall } | { shape: 'area', area }",
    outputs: 'area (m²)',
  },
  totalCutArea: {
    run: totalCutArea,
    summary: 'Total area of a list of cuts.',
    inputs: 'cuts: [{ section, count? }]',
    outputs: 'area (m²)',
  },
  breakInRemaining: {
    run: breakInRemaining,
    summary: 'Break-in area still to cut at reduced feed, and % done.',
    inputs: 'areaCut (area), breakInArea? (default 100 in²)',
    outputs: '{ breakInArea, areaCut, remaining (m²), percentDone, complete, feedFraction }',
  },
} as const satisfies Record<string, MathsFunctionEntry>;

export type MathsFunctionName = keyof typeof mathsFunctions;

/** True when the name is a registered maths function. */
export function isMathsFunctionName(name: unknown): name is MathsFunctionName {
  return typeof name === 'string' && Object.prototype.hasOwnProperty.call(mathsFunctions, name);
}

/** Runs a maths function by its registered name on untrusted input; bad input throws MathsInputError. */
export function callMathsFunction(name: string, input: unknown): unknown {
  if (!isMathsFunctionName(name)) {
    throw new MathsInputError('name', `name "${name}" is not a maths function`, 'unknown-name');
  }
  const run = mathsFunctions[name].run as (input: unknown) => unknown;
  return run(requireObject(input, 'input'));
}
