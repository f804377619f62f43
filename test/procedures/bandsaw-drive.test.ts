import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { bay2, computedOf, demoSpecs, inputOf, near, numberOf, run, specWith } from './helpers';

const DESCENT = 'common practice: a free drop of 1.0–3.0 mm/s as a starting point, set by the damper valve (no published source); rate = distance ÷ time';
const HANDBOOK = "CHECKS.md, Recommended blade speed: Machinery's Handbook, 31st ed., 'Bimetal Band Saw Speeds for Cutting 4-Inch Material with Coolant' (p. 1245): 304 stainless, 4 in → 120 ft/min (36.6 m/min); dry −30 to −50 %, carbon blade −50 %";
const DRY_CHART = 'CHECKS.md, Recommended blade speed: dry-cutting chart in a bench metal bandsaw manual, low-carbon steel 90/125/160 ft/min for 0–½ in / ½–1 in / over 1 in';
const TRAIN = 'CHECKS.md, Surface speed: through a belt and gearbox, wheel rpm = motor rpm × driver Ø ÷ driven Ø ÷ gearbox ratio; v = π·D·n';
const JONES = 'CHECKS.md, Surface speed: F. D. Jones, Turning and Boring (v = π·D·n); D = 300 mm, n = 60 rpm → 56.55 m/min';
const BELT = 'CHECKS.md, V-belts: span t = √(C² − ((D−d)/2)²), d = 150, D = 300, C = 600 mm → 595.3 mm → 9.30 mm (deflection t/64: US Army TM 5-3820-233-12 fig. 4-51; H. P. Bloch, Practical Machinery Management for Process Plants, fig. 7-14)';
const BELT_COMMON = 'common practice: about 10 mm of deflection midway between the pulleys (the demo spec’s beltDeflectionMm)';
const BREAK_IN = "CHECKS.md, Blade break-in: manufacturers' practice (no standard), about half feed for the first 50–100 in² (323–645 cm²)";

const IN2 = 6.4516; // cm² per in², exact

/** Blade speed of every step on a spec, worked out here by hand from the drive train (m/min). */
function stepSpeeds(spec: Record<string, unknown>): { label: string; speed: number }[] {
  const steps = spec['speedSteps'] as { label: string; driverMm: number; drivenMm: number }[];
  const d = (spec['wheelDiameterMm'] as number) / 1000;
  const rpm = spec['motorRpm'] as number;
  const ratio = spec['gearboxRatio'] as number;
  return steps.map((s) => ({ label: s.label, speed: Math.PI * d * ((rpm * (s.driverMm / s.drivenMm)) / ratio) }));
}

function nearestByHand(spec: Record<string, unknown>, target: number): { label: string; speed: number } {
  return stepSpeeds(spec).reduce((a, b) => (Math.abs(b.speed - target) < Math.abs(a.speed - target) ? b : a));
}

describe('setting the bow-arm descent rate', () => {
  test(`when the arm drops 100 mm in 50 s, then 2.00 mm/s is inside the starting range (${DESCENT})`, () => {
    const e = run('bow-descent', 'time-drop', { distance: 100, time: 50 });
    near(numberOf(e, 'rate'), 2, 1e-12, 'mm/s');
    assert.equal(computedOf(e, 'rate').outcome, 'pass');
    assert.equal(computedOf(e, 'rate').display, '2.00 mm/s');
  });

  test(`when the arm drops 100 mm in 20 s, then 5 mm/s is too fast and fails (${DESCENT})`, () => {
    const e = run('bow-descent', 'time-drop', { distance: 100, time: 20 });
    near(numberOf(e, 'rate'), 5, 1e-12, 'mm/s');
    assert.equal(e.outOfLimits, true);
  });

  test(`when the arm takes 200 s to drop 100 mm, then 0.5 mm/s is too slow and fails (${DESCENT})`, () => {
    assert.equal(computedOf(run('bow-descent', 'time-drop', { distance: 100, time: 200 }), 'rate').outcome, 'fail');
  });

  test('when less than 50 mm of drop is timed, then the distance reading fails (too short to time fairly)', () => {
    assert.equal(inputOf(run('bow-descent', 'time-drop', { distance: 30, time: 15 }), 'distance').outcome, 'fail');
  });
});

describe('choosing the blade speed', () => {
  test(`when 4 in (101.6 mm) 304 stainless is cut with coolant and a bi-metal blade, then 36.6 m/min is suggested (${HANDBOOK})`, () => {
    const e = run('speed-change', 'choose-speed', { material: 'stainless-304', section: 101.6, 'blade-type': 'bi-metal', cutting: 'coolant' });
    near(numberOf(e, 'recommended'), 120 * 0.3048, 1e-9, 'm/min');
    near(numberOf(e, 'recommended'), 36.6, 0.05, 'm/min');
  });

  test(`when that is set on the Bay 2 saw, then the nearest step is the one worked out by hand, with its speed and % difference (${TRAIN}; ${HANDBOOK})`, () => {
    const e = run('speed-change', 'choose-speed', { material: 'stainless-304', section: 101.6, 'blade-type': 'bi-metal', cutting: 'coolant' });
    const target = 120 * 0.3048;
    const byHand = nearestByHand(bay2, target);
    assert.equal(byHand.label, '2');
    assert.equal(computedOf(e, 'step').value, byHand.label);
    near(numberOf(e, 'step-speed'), byHand.speed, 1e-9, 'm/min');
    near(numberOf(e, 'step-speed'), 31.7, 0.05, 'm/min');
    near(numberOf(e, 'step-difference'), ((byHand.speed - target) / target) * 100, 1e-9, '%');
    near(numberOf(e, 'step-difference'), -13.3, 0.05, '%');
    assert.equal(computedOf(e, 'step-difference').unit, '%');
  });

  test(`when the same stainless is cut dry, then the suggestion drops by 30–50 % to the middle, 0.6 × 36.6 = 21.9 m/min (${HANDBOOK})`, () => {
    const e = run('speed-change', 'choose-speed', { material: 'stainless-304', section: 101.6, 'blade-type': 'bi-metal', cutting: 'dry' });
    near(numberOf(e, 'recommended'), 0.6 * 120 * 0.3048, 1e-9, 'm/min');
  });

  test(`when it is cut with a carbon blade, then the suggestion halves to 18.3 m/min and the slowest step is nearest (${HANDBOOK}; ${TRAIN})`, () => {
    const e = run('speed-change', 'choose-speed', { material: 'stainless-304', section: 101.6, 'blade-type': 'carbon', cutting: 'coolant' });
    near(numberOf(e, 'recommended'), 0.5 * 120 * 0.3048, 1e-9, 'm/min');
    assert.equal(computedOf(e, 'step').value, '1 (slowest)');
  });

  test(`when 20 mm mild steel is cut dry, then 125 ft/min (38.1 m/min) is suggested and the nearest Bay 2 step is worked out by hand (${DRY_CHART}; ${TRAIN})`, () => {
    const e = run('speed-change', 'choose-speed', { material: 'low-carbon-steel', section: 20, 'blade-type': 'bi-metal', cutting: 'dry' });
    near(numberOf(e, 'recommended'), 125 * 0.3048, 1e-9, 'm/min');
    const byHand = nearestByHand(bay2, 125 * 0.3048);
    assert.equal(computedOf(e, 'step').value, byHand.label);
    assert.equal(byHand.label, '3');
  });

  test(`when the stores saw is used, then its own speed table decides the step (${TRAIN})`, () => {
    const stores = demoSpecs[1]!.spec;
    const e = run('speed-change', 'choose-speed', { material: 'low-carbon-steel', section: 20, 'blade-type': 'bi-metal', cutting: 'dry' }, stores);
    const byHand = nearestByHand(stores, 125 * 0.3048);
    assert.equal(computedOf(e, 'step').value, byHand.label);
    near(numberOf(e, 'step-speed'), byHand.speed, 1e-9, 'm/min');
  });

  test(`when a saw's 300 mm wheel turns at 60 rpm, then its blade runs at 56.55 m/min (${JONES})`, () => {
    const spec = specWith({ motorRpm: 60, gearboxRatio: 1, wheelDiameterMm: 300, speedSteps: [{ label: 'direct', driverMm: 100, drivenMm: 100 }] });
    const e = run('speed-change', 'choose-speed', { material: 'aluminium', section: 30, 'blade-type': 'bi-metal', cutting: 'dry' }, spec);
    assert.equal(computedOf(e, 'step').value, 'direct');
    near(numberOf(e, 'step-speed'), 56.55, 0.005, 'm/min');
  });

  test('when the material is chosen but the section is not yet entered, then the suggestion and the step are pending', () => {
    const e = run('speed-change', 'choose-speed', { material: 'copper', 'blade-type': 'bi-metal', cutting: 'dry' });
    for (const id of ['recommended', 'step', 'step-speed', 'step-difference']) assert.equal(computedOf(e, id).value, null, id);
    assert.deepEqual(e.missing, ['section']);
  });
});

describe('tensioning the drive belt', () => {
  test(`when pulleys of 150 and 300 mm sit on 600 mm centres, then the span is 595.3 mm and the 1/64 deflection 9.30 mm (${BELT})`, () => {
    const e = run('speed-change', 'belt-tension', { driver: 150, driven: 300, deflection: 9, 'not-over-tight': true }, specWith({ beltCentreDistanceMm: 600 }));
    near(numberOf(e, 'span'), 595.3, 0.05, 'mm');
    near(numberOf(e, 'target-deflection'), 9.3, 0.005, 'mm');
    assert.equal(inputOf(e, 'deflection').outcome, 'pass');
  });

  test(`when the Bay 2 saw's belt runs on equal 95 mm steps, then the span equals the 420 mm centres and the 1/64 deflection is 6.56 mm (identity: equal pulleys, span = C; ${BELT})`, () => {
    const e = run('speed-change', 'belt-tension', { driver: 95, driven: 95, deflection: 10, 'not-over-tight': true });
    near(numberOf(e, 'span'), 420, 1e-9, 'mm');
    near(numberOf(e, 'target-deflection'), 420 / 64, 1e-9, 'mm');
  });

  test(`when the belt deflects about 10 mm under the thumb, then it passes; 14 mm is too slack and fails (${BELT_COMMON})`, () => {
    assert.equal(inputOf(run('speed-change', 'belt-tension', { driver: 95, driven: 95, deflection: 10, 'not-over-tight': true }), 'deflection').outcome, 'pass');
    const slack = run('speed-change', 'belt-tension', { driver: 95, driven: 95, deflection: 14, 'not-over-tight': true });
    assert.equal(inputOf(slack, 'deflection').outcome, 'fail');
    assert.equal(slack.outOfLimits, true);
  });

  test('when the belt is over-tight, then the check fails even though its deflection is under the limit', () => {
    const e = run('speed-change', 'belt-tension', { driver: 95, driven: 95, deflection: 3, 'not-over-tight': false });
    assert.equal(inputOf(e, 'deflection').outcome, 'pass');
    assert.equal(inputOf(e, 'not-over-tight').outcome, 'fail');
  });

  test('when the belt slips in the witnessed run, then the powered check fails', () => {
    assert.equal(run('speed-change', 'run', { 'no-slip': false }).outOfLimits, true);
    assert.equal(run('speed-change', 'run', { 'no-slip': true }).outOfLimits, false);
  });
});

describe('running in a new blade', () => {
  test(`when 50 in² (322.6 cm²) has been cut, then half the 100 in² running-in remains, 50 % is done and the feed stays at half (${BREAK_IN})`, () => {
    const e = run('blade-break-in', 'progress', { 'area-cut': 50 * IN2 });
    near(numberOf(e, 'remaining'), 50 * IN2, 1e-9, 'cm²');
    near(numberOf(e, 'percent-done'), 50, 1e-9, '%');
    assert.equal(numberOf(e, 'feed-now'), 0.5);
  });

  test(`when 700 cm² has been cut, then the 645 cm² running-in is done: nothing remains, 100 %, full feed (${BREAK_IN})`, () => {
    const e = run('blade-break-in', 'progress', { 'area-cut': 700 });
    assert.equal(numberOf(e, 'remaining'), 0);
    assert.equal(numberOf(e, 'percent-done'), 100);
    assert.equal(numberOf(e, 'feed-now'), 1);
  });

  test(`when nothing has been cut yet, then the whole 100 in² (645.16 cm²) remains (${BREAK_IN})`, () => {
    const e = run('blade-break-in', 'progress', { 'area-cut': 0 });
    near(numberOf(e, 'remaining'), 100 * IN2, 1e-9, 'cm²');
    assert.equal(numberOf(e, 'percent-done'), 0);
  });

  test('when a 50 mm round bar or a 40 × 20 mm flat is entered, then one cut is π·25² = 19.6 cm² or 8.0 cm² (identities), and the other shape stays pending', () => {
    const round = run('blade-break-in', 'progress', { diameter: 50, 'area-cut': 100 });
    near(numberOf(round, 'round-area'), (Math.PI * 25 * 25) / 100, 1e-9, 'cm²');
    assert.equal(computedOf(round, 'flat-area').value, null);
    const flat = run('blade-break-in', 'progress', { width: 40, height: 20, 'area-cut': 100 });
    near(numberOf(flat, 'flat-area'), 8, 1e-9, 'cm²');
    assert.equal(computedOf(flat, 'round-area').value, null);
  });

  test('when the trainee answers that the running-in area was not reached, then the finish check fails', () => {
    assert.equal(run('blade-break-in', 'finish', { 'feed-raised': false, 'tension-rechecked': true }).outOfLimits, true);
  });
});
