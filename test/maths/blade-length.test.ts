import { describe, test } from 'node:test';
import { bladeLength, centreDistanceForBlade, quantity as q } from '../../procedures/maths/index.ts';
import { nearIn, throwsFor } from './helpers.ts';

const NAVY = 'US Navy training manual, construction series, drill press and bandsaw chapter';

describe('blade length', () => {
  test(`when the wheels are 300 mm on 1,000 mm centres, then the blade is 2,942.5 mm (${NAVY})`, () => {
    nearIn(bladeLength({ wheelDiameter: q(300, 'mm'), centreDistance: q(1000, 'mm') }), 'mm', 2942.5, 0.05);
  });

  test(`when a 2,942.5 mm blade goes on 300 mm wheels, then the centres are 1,000 mm (${NAVY}, read back)`, () => {
    nearIn(centreDistanceForBlade({ bladeLength: q(2942.5, 'mm'), wheelDiameter: q(300, 'mm') }), 'mm', 1000, 0.05);
  });

  test('when the sizes are given in inches, then L = π·D + 2·C in inches (identity: 10 in wheels on 20 in centres give 10π + 40 in)', () => {
    nearIn(bladeLength({ wheelDiameter: q(10, 'in'), centreDistance: q(20, 'in') }), 'in', 10 * Math.PI + 40, 1e-9);
  });

  test('when the blade is no longer than one wheel circumference, then the error names bladeLength', () => {
    throwsFor(() => centreDistanceForBlade({ bladeLength: q(900, 'mm'), wheelDiameter: q(300, 'mm') }), 'bladeLength', 'out-of-range');
  });

  test('when the centre distance is zero, then the error names centreDistance', () => {
    throwsFor(() => bladeLength({ wheelDiameter: q(300, 'mm'), centreDistance: q(0, 'mm') }), 'centreDistance', 'zero');
  });
});
