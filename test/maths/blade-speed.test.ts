import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  defaultBladeSpeedTable,
  quantity as q,
  recommendBladeSpeed,
  type BladeSpeedRow,
  type WorkshopSpeedTable,
} from '../../procedures/maths/index.ts';
import { nearIn, throwsFor } from './helpers.ts';

const MH = "Machinery's Handbook, 31st ed., 'Bimetal Band Saw Speeds for Cutting 4-Inch Material with Coolant', p. 1245";
const CHART = 'dry-cutting chart in a bench metal bandsaw manual';

describe('recommended blade speed, handbook row', () => {
  test(`when 304 stainless 4 in is cut with coolant and a bi-metal blade, then 120 ft/min = 36.6 m/min (${MH})`, () => {
    const r = recommendBladeSpeed({ material: 'stainless-304', section: q(4, 'in'), blade: 'bi-metal', cutting: 'coolant' });
    nearIn(r.speed, 'ft/min', 120, 1e-9);
    nearIn(r.speed, 'm/min', 36.6, 0.05);
    assert.equal(r.basis.source.title, "Machinery's Handbook, 31st ed.");
    assert.deepEqual(r.basis.adjustments, []);
    assert.equal(r.basis.origin, 'default');
    assert.match(r.basis.summary, /120 ft\/min; no adjustments/);
  });

  // Section adjustments from the same handbook table: ¼ in +15 %, ¾ in +12 %, 1¼ in +10 %, 8 in −12 %.
  for (const [size, percent] of [
    [0.25, 15],
    [0.75, 12],
    [1.25, 10],
    [8, -12],
  ] as const) {
    test(`when the section is ${size} in, then the speed is 120 ft/min ${percent > 0 ? '+' : ''}${percent} % = ${(120 * (1 + percent / 100)).toFixed(1)} ft/min (${MH}, size adjustment)`, () => {
      const r = recommendBladeSpeed({ material: 'stainless-304', section: q(size, 'in'), blade: 'bi-metal', cutting: 'coolant' });
      nearIn(r.speed, 'ft/min', 120 * (1 + percent / 100), 1e-9);
      assert.equal(r.basis.adjustments[0]?.name, 'section size');
    });
  }

  test(`when the section falls between listed sizes (2 in), then the size adjustment is interpolated in a straight line: +10 % × (4 − 2)/(4 − 1.25) = +7.27 %, 128.7 ft/min (our interpolation of ${MH})`, () => {
    const r = recommendBladeSpeed({ material: 'stainless-304', section: q(2, 'in'), blade: 'bi-metal', cutting: 'coolant' });
    nearIn(r.speed, 'ft/min', 120 * (1 + (0.1 * 2) / 2.75), 1e-9);
  });

  test(`when cutting dry, then the speed is reduced 30–50 %: 60–84 ft/min, middle 72 (${MH}, dry adjustment)`, () => {
    const r = recommendBladeSpeed({ material: 'stainless-304', section: q(4, 'in'), blade: 'bi-metal', cutting: 'dry' });
    nearIn(r.low, 'ft/min', 60, 1e-9);
    nearIn(r.high, 'ft/min', 84, 1e-9);
    nearIn(r.speed, 'ft/min', 72, 1e-9);
    assert.deepEqual(
      r.basis.adjustments.map((a) => [a.name, a.percentLow, a.percentHigh]),
      [['cutting dry', -50, -30]],
    );
  });

  test(`when a carbon-steel blade is used, then the speed is reduced 50 %: 60 ft/min (${MH}, carbon blade adjustment)`, () => {
    const r = recommendBladeSpeed({ material: 'stainless-304', section: q(4, 'in'), blade: 'carbon', cutting: 'coolant' });
    nearIn(r.speed, 'ft/min', 60, 1e-9);
    assert.equal(r.basis.adjustments[0]?.name, 'carbon-steel blade');
  });

  test(`when a carbon blade cuts dry, then both reductions apply: 120 × 0.5 × (0.5…0.7) = 30–42 ft/min (${MH})`, () => {
    const r = recommendBladeSpeed({ material: 'stainless-304', section: q(4, 'in'), blade: 'carbon', cutting: 'dry' });
    nearIn(r.low, 'ft/min', 30, 1e-9);
    nearIn(r.high, 'ft/min', 42, 1e-9);
  });
});

describe('recommended blade speed, dry-cutting chart', () => {
  // ft/min for sections 0–½ in, ½–1 in, over 1 in, from the chart quoted in CHECKS.md.
  const chart: [string, number, number, number][] = [
    ['low-carbon-steel', 90, 125, 160],
    ['medium-carbon-steel', 75, 100, 125],
    ['tool-steel', 35, 50, 65],
    ['cast-iron', 90, 125, 160],
    ['aluminium', 185, 250, 315],
    ['brass-soft', 375, 500, 625],
    ['brass-hard-bronze', 150, 200, 250],
    ['copper', 185, 250, 315],
  ];
  for (const [material, small, mid, large] of chart) {
    test(`when ${material} is cut dry at 0.4 in, 0.75 in and 2 in, then ${small}/${mid}/${large} ft/min (${CHART})`, () => {
      const at = (size: number) =>
        recommendBladeSpeed({ material, section: q(size, 'in'), blade: 'bi-metal', cutting: 'dry' });
      nearIn(at(0.4).speed, 'ft/min', small, 1e-9);
      nearIn(at(0.75).speed, 'ft/min', mid, 1e-9);
      nearIn(at(2).speed, 'ft/min', large, 1e-9);
      assert.equal(at(2).basis.source.title, 'Dry-cutting speed chart in a bench metal bandsaw manual');
    });
  }

  test(`when a section is given in mm, then it is banded by its size in inches: 20 mm = 0.79 in is the ½–1 in band, 125 ft/min for low-carbon steel (${CHART})`, () => {
    const r = recommendBladeSpeed({ material: 'low-carbon-steel', section: q(20, 'mm'), blade: 'bi-metal', cutting: 'dry' });
    nearIn(r.speed, 'ft/min', 125, 1e-9);
    assert.match(r.basis.row, /over 0.5 in up to 1 in/);
  });

  test('when the chart row is asked for coolant or a carbon blade, then it is not adjusted and the basis says why', () => {
    const r = recommendBladeSpeed({ material: 'aluminium', section: q(2, 'in'), blade: 'carbon', cutting: 'coolant' });
    nearIn(r.speed, 'ft/min', 315, 1e-9);
    assert.deepEqual(r.basis.adjustments, []);
    assert.equal(r.basis.notes.length, 2);
    assert.match(r.basis.notes.join(' '), /dry cutting/);
    assert.match(r.basis.notes.join(' '), /blade type/);
  });
});

describe('recommended blade speed, workshop table', () => {
  const workshopSource = { title: 'Our workshop speed sheet', confidence: 'workshop' } as const;
  const ownLowCarbon: BladeSpeedRow = {
    material: 'low-carbon-steel',
    name: 'low-carbon steel (our sheet)',
    source: workshopSource,
    cutting: 'coolant',
    blade: 'bi-metal',
    kind: 'bands',
    bands: [{ speed: q(70, 'm/min') }],
  };

  test('when a workshop row covers the material, then it wins over the default table and the basis says workshop', () => {
    const table: WorkshopSpeedTable = { rows: [ownLowCarbon] };
    const r = recommendBladeSpeed({ material: 'low-carbon-steel', section: q(50, 'mm'), blade: 'bi-metal', cutting: 'coolant', table });
    nearIn(r.speed, 'm/min', 70, 1e-9);
    assert.equal(r.basis.origin, 'workshop');
    assert.equal(r.basis.source.title, 'Our workshop speed sheet');
  });

  test(`when a workshop table extends the default, then other materials still come from the default (${CHART}: copper over 1 in, 315 ft/min)`, () => {
    const r = recommendBladeSpeed({ material: 'copper', section: q(2, 'in'), blade: 'bi-metal', cutting: 'dry', table: { rows: [ownLowCarbon] } });
    nearIn(r.speed, 'ft/min', 315, 1e-9);
    assert.equal(r.basis.origin, 'default');
  });

  test('when a workshop table replaces the default, then a material it lacks is refused naming material', () => {
    throwsFor(
      () => recommendBladeSpeed({ material: 'copper', section: q(2, 'in'), blade: 'bi-metal', cutting: 'dry', table: { mode: 'replace', rows: [ownLowCarbon] } }),
      'material',
      'unknown-name',
    );
  });

  test("when a workshop row cut with coolant is asked for dry cutting, then the handbook's 30–50 % reduction applies (identity: 70 m/min → 35–49 m/min)", () => {
    const r = recommendBladeSpeed({ material: 'low-carbon-steel', section: q(50, 'mm'), blade: 'bi-metal', cutting: 'dry', table: { rows: [ownLowCarbon] } });
    nearIn(r.low, 'm/min', 35, 1e-9);
    nearIn(r.high, 'm/min', 49, 1e-9);
  });

  test('when a workshop gives its own adjustment rules, then they replace the default rules (identity: dry −20 % exactly)', () => {
    const r = recommendBladeSpeed({
      material: 'low-carbon-steel',
      section: q(50, 'mm'),
      blade: 'bi-metal',
      cutting: 'dry',
      table: { rows: [ownLowCarbon], adjustments: { dryCutting: { minPercent: 20, maxPercent: 20, source: workshopSource } } },
    });
    nearIn(r.speed, 'm/min', 56, 1e-9);
  });

  test('when the default table is read, then every row names its source', () => {
    for (const row of defaultBladeSpeedTable.rows) assert.ok(row.source.title.length > 0, row.material);
  });

  test('when the material is not in any table, then the error names material', () => {
    throwsFor(() => recommendBladeSpeed({ material: 'unobtainium', section: q(1, 'in'), blade: 'bi-metal', cutting: 'dry' }), 'material');
  });

  test('when the blade type is neither bi-metal nor carbon, then the error names blade', () => {
    throwsFor(
      () => recommendBladeSpeed({ material: 'copper', section: q(1, 'in'), blade: 'diamond' as 'carbon', cutting: 'dry' }),
      'blade',
    );
  });
});
