import { sourceText } from './display';
import { sources } from '@setwright/maths';

/** How a card's result is worked out and where the rule comes from, in our words. */
export interface Working {
  readonly formula: readonly string[];
  readonly source: string;
}

/** The working behind each card. The arithmetic itself lives only in the maths library. */
export const WORKINGS = {
  pulleySpeed: {
    formula: [
      'Wheel speed = motor speed × driver pulley Ø ÷ driven pulley Ø ÷ gearbox ratio',
      'Blade speed = π × wheel Ø × wheel speed',
    ],
    source: 'Surface speed v = π·D·n, the cutting-speed formula in F. D. Jones, Turning and Boring; standard kinematics.',
  },
  nearestStep: {
    formula: [
      'Each step’s blade speed = π × wheel Ø × motor speed × driver Ø ÷ driven Ø ÷ gearbox ratio',
      'Difference = (step speed − recommended speed) ÷ recommended speed × 100 %',
      'Not faster: the fastest step at or below the recommendation; the slowest if every step is faster',
    ],
    source: 'Standard kinematics; choosing the step is common practice.',
  },
  recommendedSpeed: {
    formula: [
      'Starting speed = the table speed for the material and section size',
      '× the section-size change (when the table is for another size)',
      '× 0.5 to 0.7 when the table is for coolant and you cut dry',
      '× 0.5 when the table is for bi-metal and you run a carbon blade',
      'The middle of the low–high range is shown large',
    ],
    source: `${sourceText(sources.handbookBimetal)}; ${sourceText(sources.benchSawDryChart)}.`,
  },
  toothPitch: {
    formula: [
      'Width of cut t: solid bar = its size; tube and structural = area ÷ travel of the blade through it',
      'Teeth in the cut = TPI × t (in inches); keep it between 3 and 12',
      'So TPI from 3 ÷ t to 12 ÷ t; the pitch nearest 6 teeth in the cut is suggested',
    ],
    source: `${sourceText(sources.threeTeethRule)}; ${sourceText(sources.teethInCutUpper)}.`,
  },
  bladeTension: {
    formula: [
      'Stress in one strand = strand tension ÷ (blade width × thickness)',
      'A gauge on the tensioner reads the wheel load, which two strands share: strand tension = wheel load ÷ 2',
      'Tension for a stress = stress × width × thickness (the wheel load is twice that)',
      'Stretch gauge: stress = E × stretch ÷ gauge length',
    ],
    source: `${sourceText(sources.stressTargets)}; ${sourceText(sources.elasticModuli)}; 1 kgf = 9.80665 N (NIST SP 811, B.8).`,
  },
  bladeLength: {
    formula: ['Blade length = π × wheel Ø + 2 × centre distance', 'Centre distance = (blade length − π × wheel Ø) ÷ 2'],
    source:
      'US Navy training manual, construction series, drill press and bandsaw chapter: ' +
      'one wheel’s circumference plus twice the centres.',
  },
  driveBelt: {
    formula: [
      'Span = √(C² − ((D − d) ÷ 2)²)',
      'Belt length ≈ 2C + π(D + d) ÷ 2 + (D − d)² ÷ 4C',
      'Target deflection at mid-span = span ÷ 64 (1/64 in per inch of span)',
    ],
    source: `A Textbook of Engineering Mechanics, ch. 33 (belt length); ${sourceText(sources.beltDeflection)}.`,
  },
  squareness: {
    formula: ['Angle out of square = atan(gap ÷ height of the square)', 'Error over 100 mm = 100 mm × gap ÷ height'],
    source: 'Right-angle trigonometry; common practice.',
  },
  feelerStack: {
    formula: ['The fewest leaves, each used once, that add up to the gap within the tolerance; the closest wins a tie'],
    source: `${sourceText(sources.feelerSet)}.`,
  },
  descent: {
    formula: [
      'Descent rate = distance dropped ÷ time taken',
      'Time through the work = depth of cut ÷ descent rate',
      'Or: cut time = section area ÷ cutting rate',
    ],
    source: 'Distance over time; common practice.',
  },
  breakIn: {
    formula: [
      'Area cut = area of one cut × number of cuts',
      'Still to cut at reduced feed = break-in area − area cut (never below zero)',
      'Done = area cut ÷ break-in area × 100 %',
    ],
    source: `${sourceText(sources.breakIn)}.`,
  },
} as const satisfies Record<string, Working>;
