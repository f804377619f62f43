import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  bladeStress,
  bladeStressTargets,
  forceForStress,
  gaugeReadingFor,
  judgeBladeStress,
  quantity as q,
  steelModulus,
  strandTension,
  stressFromStretch,
  stretchForStress,
  valueIn,
} from '../../procedures/maths/index.ts';
import { near, nearIn, throwsFor } from './helpers.ts';

const WORKED = 'CHECKS.md, Blade tension, worked example (σ = F/(w·t); 1 kgf = 9.80665 N, 1 psi = 6,894.757 Pa, NIST SP 811 B.8)';
const MODULI = 'Triton College strength-of-materials tables; Halliday, Resnick & Walker, table of elastic moduli';
const TARGETS = 'trade articles on blade tension (medium confidence)';

describe('blade stress from force', () => {
  test(`when a ½ in × 0.025 in blade is to carry 25,000 psi, then each strand needs 312.5 lbf (${WORKED})`, () => {
    const r = forceForStress({ stress: q(25_000, 'psi'), width: q(0.5, 'in'), thickness: q(0.025, 'in') });
    near(r.strandReadout.lbf, 312.5, 0.01, 'lbf');
    near(r.wheelLoadReadout.lbf, 625, 0.02, 'wheel load lbf (2 strands)');
  });

  test(`when a 27 × 0.9 mm blade carries 500 kgf per strand, then 4,903 N, 201.8 MPa, 29,266 psi (${WORKED})`, () => {
    const r = bladeStress({ force: q(500, 'kgf'), reads: 'strand', width: q(27, 'mm'), thickness: q(0.9, 'mm') });
    nearIn(r.section, 'mm^2', 24.3, 1e-9);
    near(r.forceReadout.N, 4903, 0.5, 'N');
    near(r.stressReadout.MPa, 201.8, 0.05, 'MPa');
    near(r.stressReadout.psi, 29_266, 1, 'psi');
    assert.equal(r.stress.unit, 'Pa');
  });

  test(`when a 27 × 0.9 mm blade is to carry 200 MPa, then each strand needs 4,860 N = 495.6 kgf (${WORKED})`, () => {
    const r = forceForStress({ stress: q(200, 'MPa'), width: q(27, 'mm'), thickness: q(0.9, 'mm') });
    near(r.strandReadout.N, 4860, 0.5, 'N');
    near(r.strandReadout.kgf, 495.6, 0.05, 'kgf');
  });
});

describe('what the gauge reads', () => {
  const GAUGE = "CHECKS.md, 'What a gauge reads matters' (strand = wheel load ÷ 2)";

  test(`when 800 kgf is read as wheel load on a 27 × 0.9 mm blade, then 400 kgf per strand and 161 MPa (${GAUGE})`, () => {
    nearIn(strandTension({ reading: q(800, 'kgf'), reads: 'wheel-load' }), 'kgf', 400, 1e-9);
    const r = bladeStress({ force: q(800, 'kgf'), reads: 'wheel-load', width: q(27, 'mm'), thickness: q(0.9, 'mm') });
    near(r.stressReadout.MPa, 161, 0.5, 'MPa');
  });

  test(`when 800 kgf is read as strand tension on the same blade, then 323 MPa (${GAUGE})`, () => {
    const r = bladeStress({ force: q(800, 'kgf'), reads: 'strand', width: q(27, 'mm'), thickness: q(0.9, 'mm') });
    near(r.stressReadout.MPa, 323, 0.5, 'MPa');
  });

  test(`when 161 MPa is judged, then it lies within the usual targets (103–207 MPa across blade types) and not over the limit; 323 MPa is over it (${GAUGE}; ${TARGETS})`, () => {
    const within = bladeStress({ force: q(800, 'kgf'), reads: 'wheel-load', width: q(27, 'mm'), thickness: q(0.9, 'mm') }).stress;
    const over = bladeStress({ force: q(800, 'kgf'), reads: 'strand', width: q(27, 'mm'), thickness: q(0.9, 'mm') }).stress;
    const mpa = valueIn(within, 'MPa');
    assert.ok(mpa >= 103 && mpa <= 207, `${mpa} MPa`);
    for (const blade of ['carbon', 'bi-metal'] as const) {
      assert.notEqual(judgeBladeStress({ stress: within, blade }).verdict, 'over-limit');
      assert.equal(judgeBladeStress({ stress: over, blade }).verdict, 'over-limit');
    }
  });

  test('when a wheel-load gauge must show a strand tension, then it reads twice the strand (identity: two strands share the load)', () => {
    nearIn(gaugeReadingFor({ strandForce: q(400, 'kgf'), reads: 'wheel-load' }), 'kgf', 800, 1e-9);
    nearIn(gaugeReadingFor({ strandForce: q(400, 'kgf'), reads: 'strand' }), 'kgf', 400, 1e-9);
  });
});

describe('stress from a stretch gauge', () => {
  test(`when a gauge shows 0.001 in over 5 in with E = 30×10⁶ psi, then about 6,000 psi (woodworking magazine article, Feb 2001)`, () => {
    const r = stressFromStretch({ elongation: q(0.001, 'in'), gaugeLength: q(5, 'in'), modulus: q(30e6, 'psi') });
    near(r.stressReadout.psi, 6000, 1e-6, 'psi');
  });

  test(`when the same reading is on carbon steel (207 GPa ≈ 30×10⁶ psi, ${MODULI}), then still about 6,000 psi (Feb 2001 article)`, () => {
    const r = stressFromStretch({ elongation: q(0.001, 'in'), gaugeLength: q(5, 'in'), steel: 'carbon-steel' });
    near(r.stressReadout.psi, 6000, 10, 'psi');
  });

  test(`when 200 MPa is wanted over L₀ = 100 mm with E = 200 GPa, then ΔL = 0.100 mm (CHECKS metric worked example; ${MODULI})`, () => {
    nearIn(stretchForStress({ stress: q(200, 'MPa'), gaugeLength: q(100, 'mm'), steel: 'structural' }), 'mm', 0.1, 1e-12);
  });

  test('when the gauge shows 0.100 mm over 100 mm on structural steel, then 200 MPa (CHECKS metric worked example, read back)', () => {
    const r = stressFromStretch({ elongation: q(0.1, 'mm'), gaugeLength: q(100, 'mm'), steel: 'structural' });
    near(r.stressReadout.MPa, 200, 1e-9);
    near(r.strain, 0.001, 1e-15);
  });

  test(`when the steel table is read, then 200 GPa structural and stainless (29×10⁶ psi), 207 GPa carbon (30×10⁶ psi), 210 GPa tool (${MODULI})`, () => {
    nearIn(steelModulus.structural.modulus, 'GPa', 200, 0);
    nearIn(steelModulus.stainless.modulus, 'GPa', 200, 0);
    nearIn(steelModulus['carbon-steel'].modulus, 'GPa', 207, 0);
    nearIn(steelModulus['tool-steel'].modulus, 'GPa', 210, 0);
    nearIn(steelModulus.structural.modulus, 'psi', 29e6, 0.02e6);
    nearIn(steelModulus['carbon-steel'].modulus, 'psi', 30e6, 0.03e6);
  });

  test('when no steel or modulus is given, then the error names steel', () => {
    throwsFor(() => stressFromStretch({ elongation: q(0.1, 'mm'), gaugeLength: q(100, 'mm') }), 'steel');
  });
});

describe('judging blade stress', () => {
  test(`when the targets are read in MPa, then carbon 103–138, bi-metal 172–207, limit 241 (${TARGETS})`, () => {
    nearIn(bladeStressTargets.carbon.low, 'MPa', 103, 0.5);
    nearIn(bladeStressTargets.carbon.high, 'MPa', 138, 0.5);
    nearIn(bladeStressTargets['bi-metal'].low, 'MPa', 172, 0.5);
    nearIn(bladeStressTargets['bi-metal'].high, 'MPa', 207, 0.5);
    nearIn(bladeStressTargets.limit, 'MPa', 241, 0.5);
  });

  test(`when 201.8 MPa is judged (${WORKED}), then within for bi-metal and high for carbon (${TARGETS})`, () => {
    assert.equal(judgeBladeStress({ stress: q(201.8, 'MPa'), blade: 'bi-metal' }).verdict, 'within');
    assert.equal(judgeBladeStress({ stress: q(201.8, 'MPa'), blade: 'carbon' }).verdict, 'high');
  });

  test(`when 15,000 and 20,000 psi are judged for carbon, then both are within; 14,000 psi is low (${TARGETS})`, () => {
    assert.equal(judgeBladeStress({ stress: q(15_000, 'psi'), blade: 'carbon' }).verdict, 'within');
    assert.equal(judgeBladeStress({ stress: q(20_000, 'psi'), blade: 'carbon' }).verdict, 'within');
    assert.equal(judgeBladeStress({ stress: q(14_000, 'psi'), blade: 'carbon' }).verdict, 'low');
  });

  test(`when 35,000 psi is judged, then it is high but not over; 36,000 psi is over the limit (${TARGETS})`, () => {
    assert.equal(judgeBladeStress({ stress: q(35_000, 'psi'), blade: 'bi-metal' }).verdict, 'high');
    const over = judgeBladeStress({ stress: q(36_000, 'psi'), blade: 'bi-metal' });
    assert.equal(over.verdict, 'over-limit');
    assert.match(over.message, /35000 psi/);
  });
});
