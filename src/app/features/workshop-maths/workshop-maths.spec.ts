import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { SessionUser } from '@setwright/contracts/auth';
import type { MachineSummary } from '@setwright/contracts/machines';
import {
  bladeLength,
  bladeStress,
  beltDeflectionTarget,
  beltSpan,
  breakInRemaining,
  centreDistanceForBlade,
  cutTime,
  descentRate,
  descentTime,
  feelerStack,
  judgeBladeStress,
  nearestSpeedStep,
  openBeltLength,
  recommendBladeSpeed,
  squarenessError,
  toDisplay,
  toothPitch,
  totalCutArea,
  valueIn,
  wheelSurfaceSpeed,
  type DisplayMeasure,
  type Quantity,
  type UnitSystem,
} from '@setwright/maths';
import fc from 'fast-check';
import { Session } from '../../core/session';
import { MathsCardHarness } from './ui/maths-card-harness';
import { unitChoiceKey } from './unit-choice';
import { WorkshopMaths } from './workshop-maths';

const ELLIS: SessionUser = { id: 'p-ellis', email: 'ellis@tests.example', displayName: 'Ellis', roles: ['trainee'] };
const NIA: SessionUser = { id: 'p-nia', email: 'nia@tests.example', displayName: 'Nia', roles: ['trainee'] };

/** Two invented saws, shaped as GET /api/machines returns them. */
const MACHINES: MachineSummary[] = [
  {
    id: 'm-bay-2',
    name: 'Bay 2 bandsaw',
    assetTag: 'TST-SAW-01',
    location: 'Bay 2',
    kind: 'horizontal_bandsaw',
    model: 'Test saw 260',
    spec: {
      wheelDiameterMm: 300,
      centreDistanceMm: 900,
      bladeLengthMm: 2742,
      bladeWidthMm: 27,
      bladeThicknessMm: 0.9,
      tensionRangeKgf: { min: 700, max: 900 },
      tensionReads: 'wheel_load',
      motorRpm: 1400,
      gearboxRatio: 30,
      speedSteps: [
        { label: '1 (slowest)', driverMm: 60, drivenMm: 133 },
        { label: '2', driverMm: 80, drivenMm: 111 },
      ],
      beltCentreDistanceMm: 420,
      beltDeflectionMm: 10,
    },
  },
  {
    id: 'm-stores',
    name: 'Stores bandsaw',
    assetTag: 'TST-SAW-02',
    location: 'Stores',
    kind: 'horizontal_bandsaw',
    model: 'Test saw 320',
    spec: { wheelDiameterMm: 350, bladeWidthMm: 34, bladeThicknessMm: 1.1, tensionReads: 'strand', speedSteps: [] },
  },
];

/** A library quantity as the page should print it: the display unit for the system, fixed decimals. */
function printed(q: Quantity, measure: DisplayMeasure, system: UnitSystem, decimals: number): string {
  return toDisplay(q, measure, system).value.toFixed(decimals);
}

const mm = (value: number): Quantity => ({ value, unit: 'mm' });

describe('WorkshopMaths', () => {
  async function setUp(options: { machines?: MachineSummary[]; user?: SessionUser } = {}) {
    const user = signal<SessionUser | null>(options.user ?? ELLIS);
    TestBed.configureTestingModule({
      imports: [WorkshopMaths],
      providers: [
        provideZonelessChangeDetection(),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: Session, useValue: { user: user.asReadonly() } satisfies Pick<Session, 'user'> },
      ],
    });
    const fixture = TestBed.createComponent(WorkshopMaths);
    const http = TestBed.inject(HttpTestingController);
    fixture.detectChanges();
    // Harness calls wait for stability, and a pending request is not stable: answer the register first.
    await new Promise((resolve) => setTimeout(resolve));
    http.expectOne('/api/machines').flush(options.machines ?? []);
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const card = (heading: string) => loader.getHarness(MathsCardHarness.with({ heading }));
    const units = (text: 'Metric' | 'Imperial') => loader.getHarness(MatButtonToggleHarness.with({ text }));
    return { fixture, http, loader, card, units, user };
  }

  afterEach(() => {
    TestBed.inject(HttpTestingController).verify();
    for (const person of [ELLIS, NIA]) localStorage.removeItem(unitChoiceKey(person.id));
  });

  describe('each calculator shows the library’s answer', () => {
    it('when the pulley train is entered, then the blade and wheel speeds are the library’s', async () => {
      const { card } = await setUp();
      const speed = await card('Blade speed from the pulleys');
      await speed.fill({ 'Motor speed': '1400', 'Driver pulley Ø': '60', 'Driven pulley Ø': '133', 'Gearbox ratio': '30', 'Wheel diameter': '300' });

      const expected = wheelSurfaceSpeed({
        motorSpeed: { value: 1400, unit: 'rpm' },
        driverPulley: mm(60),
        drivenPulley: mm(133),
        gearboxRatio: 30,
        wheelDiameter: mm(300),
      });
      const blade = await speed.reading('Blade speed');
      expect(await blade.getValue()).toBe(printed(expected.surfaceSpeed, 'bladeSpeed', 'metric', 1));
      expect(await blade.getUnit()).toBe('m/min');
      expect(await (await speed.reading('Wheel speed')).getText()).toBe(`${printed(expected.wheelSpeed, 'wheelSpeed', 'metric', 1)} rpm`);
    });

    it('when a material, size, blade and dry cutting are chosen, then the library’s speed shows with its basis and source', async () => {
      const { card } = await setUp();
      const rec = await card('Recommended blade speed');
      await rec.pick('Material', '304 stainless steel');
      await rec.fill({ 'Section size': '20' });
      await rec.choose('Carbon steel');
      await rec.choose('Dry');

      const expected = recommendBladeSpeed({ material: 'stainless-304', section: mm(20), blade: 'carbon', cutting: 'dry' });
      expect(expected.basis.adjustments.length).toBe(3);
      expect(await (await rec.reading('Start at')).getText()).toBe(`${printed(expected.speed, 'bladeSpeed', 'metric', 1)} m/min`);
      expect(await (await rec.reading('Range')).getValue()).toBe(
        `${printed(expected.low, 'bladeSpeed', 'metric', 1)}–${printed(expected.high, 'bladeSpeed', 'metric', 1)}`,
      );
      const results = await rec.resultsText();
      expect(results).toContain(expected.basis.row);
      for (const adjustment of expected.basis.adjustments) expect(results).toContain(adjustment.name);
      expect(results).toContain(expected.basis.source.title);
    });

    it('when a recommendation and two speed steps are entered, then the library’s nearest step and difference show', async () => {
      const { card } = await setUp();
      const nearest = await card('Nearest speed step');
      await nearest.fill({ 'Recommended speed': '40', 'Motor speed': '1400', 'Gearbox ratio': '30', 'Wheel diameter': '300' });
      await (await nearest.input('Driver Ø', 0)).setValue('60');
      await (await nearest.input('Driven Ø', 0)).setValue('133');
      await nearest.click(/Add a step/);
      await (await nearest.input('Driver Ø', 1)).setValue('95');
      await (await nearest.input('Driven Ø', 1)).setValue('95');

      const expected = nearestSpeedStep({
        recommended: { value: 40, unit: 'm/min' },
        table: {
          motorSpeed: { value: 1400, unit: 'rpm' },
          wheelDiameter: mm(300),
          gearboxRatio: 30,
          steps: [
            { label: '1', driverPulley: mm(60), drivenPulley: mm(133) },
            { label: '2', driverPulley: mm(95), drivenPulley: mm(95) },
          ],
        },
      });
      expect(await (await nearest.reading('Use step')).getValue()).toBe(expected.step.label);
      expect(await (await nearest.reading('Blade speed there')).getText()).toBe(`${printed(expected.step.surfaceSpeed, 'bladeSpeed', 'metric', 1)} m/min`);
      const difference = await nearest.reading('Against the recommendation');
      expect(await difference.getValue()).toBe(Math.abs(expected.differencePercent).toFixed(1));
      expect(await difference.getUnit()).toBe(expected.differencePercent > 0 ? '% faster' : '% slower');
    });

    it('when a tube is entered, then the library’s variable and constant pitches show', async () => {
      const { card } = await setUp();
      const pitch = await card('Tooth pitch');
      await pitch.choose('Tube');
      await pitch.fill({ 'Outside Ø': '101.6', 'Inside Ø': '76.2' });

      const expected = toothPitch({ section: { shape: 'tube', outside: mm(101.6), inside: mm(76.2) } });
      expect(await (await pitch.reading('Variable pitch')).getText()).toBe(`${expected.variable.label} TPI`);
      expect(await (await pitch.reading('Constant pitch')).getText()).toBe(`${expected.constant.label} TPI`);
      expect(await (await pitch.reading('Width of cut')).getText()).toBe(`${printed(expected.widthOfCut, 'length', 'metric', 1)} mm`);
    });

    it('when a wheel-load reading is entered, then the library’s stress and its judgement show under the guidance caution', async () => {
      const { card } = await setUp();
      const tension = await card('Blade tension');
      expect(await tension.text()).toContain('Tension the blade to the machine maker’s figures');
      await tension.fill({ 'Blade width': '27', 'Blade thickness': '0.9', 'Gauge reading': '800' });

      const expected = bladeStress({ force: { value: 800, unit: 'kgf' }, reads: 'wheel-load', width: mm(27), thickness: mm(0.9) });
      expect(await (await tension.reading('Stress in the blade')).getText()).toBe(`${printed(expected.stress, 'stress', 'metric', 1)} MPa`);
      expect(await (await tension.reading('Tension in each strand')).getText()).toBe(`${printed(expected.strandForce, 'tension', 'metric', 1)} kgf`);
      const verdict = judgeBladeStress({ stress: expected.stress, blade: 'bi-metal' }).verdict;
      expect(verdict).toBe('low');
      expect(await tension.resultsText()).toContain('Below the usual');
    });

    it('when the same reading is taken as one strand, then the library judges it past the limit and the card says stop', async () => {
      const { card } = await setUp();
      const tension = await card('Blade tension');
      await tension.fill({ 'Blade width': '27', 'Blade thickness': '0.9', 'Gauge reading': '800' });
      await tension.choose('Gauge reads one strand');

      const expected = bladeStress({ force: { value: 800, unit: 'kgf' }, reads: 'strand', width: mm(27), thickness: mm(0.9) });
      const judgement = judgeBladeStress({ stress: expected.stress, blade: 'bi-metal' });
      expect(judgement.verdict).toBe('over-limit');
      expect(await (await tension.reading('Stress in the blade')).getValue()).toBe(printed(expected.stress, 'stress', 'metric', 1));
      expect(await tension.resultsText()).toContain(`Past the ${printed(judgement.limit, 'stress', 'metric', 1)} MPa a blade should never reach`);
    });

    it('when wheel size and centres are entered, then the library’s blade length shows, and back again for the centres', async () => {
      const { card } = await setUp();
      const length = await card('Blade length and wheel centres');
      await length.fill({ 'Wheel diameter': '300', 'Centre distance': '1000' });
      const blade = bladeLength({ wheelDiameter: mm(300), centreDistance: mm(1000) });
      expect(await (await length.reading('Blade length')).getText()).toBe(`${printed(blade, 'length', 'metric', 1)} mm`);

      await length.choose('Centre distance');
      await length.fill({ 'Blade length': '2900' });
      const centres = centreDistanceForBlade({ bladeLength: mm(2900), wheelDiameter: mm(300) });
      expect(await (await length.reading('Centre distance')).getText()).toBe(`${printed(centres, 'length', 'metric', 1)} mm`);
    });

    it('when two pulleys and their centres are entered, then the library’s span, length and target deflection show', async () => {
      const { card } = await setUp();
      const belt = await card('Drive belt');
      await belt.fill({ 'Driver pulley Ø': '150', 'Driven pulley Ø': '300', 'Pulley centres': '600' });

      const pair = { driverPulley: mm(150), drivenPulley: mm(300), centreDistance: mm(600) };
      const span = beltSpan(pair);
      expect(await (await belt.reading('Target deflection')).getText()).toBe(`${printed(beltDeflectionTarget({ span }), 'length', 'metric', 1)} mm`);
      expect(await (await belt.reading('Span')).getText()).toBe(`${printed(span, 'length', 'metric', 1)} mm`);
      expect(await (await belt.reading('Belt length')).getText()).toBe(`${printed(openBeltLength(pair), 'length', 'metric', 1)} mm`);
    });

    it('when a feeler gap, square height and tolerance are entered, then the library’s angle, error and verdict show', async () => {
      const { card } = await setUp();
      const square = await card('Squareness from a feeler gap');
      await square.fill({ 'Feeler gap': '0.05', 'Height of the square': '150', 'Allowed gap': '0.05' });

      const expected = squarenessError({ gap: mm(0.05), squareHeight: mm(150), tolerance: { gap: mm(0.05), over: mm(100) } });
      const angle = `${expected.degreesMinutes.degrees}° ${expected.degreesMinutes.minutes.toFixed(1)}′`;
      expect(await (await square.reading('Out of square by')).getValue()).toBe(angle);
      expect(await (await square.reading('Error')).getText()).toBe(`${valueIn(expected.errorPer100mm, 'mm').toFixed(3)} mm per 100 mm`);
      expect(expected.pass).toBeTrue();
      expect(await (await square.reading('Against your tolerance')).getValue()).toBe('Within');
    });

    it('when a gap is asked for, then the library’s feeler stack shows', async () => {
      const { card } = await setUp();
      const feelers = await card('Feeler stack');
      await feelers.fill({ 'Gap to make': '0.37' });

      const expected = feelerStack({ target: mm(0.37), tolerance: mm(0.005) });
      expect(expected).not.toBeNull();
      expect(await (await feelers.reading('Stack these leaves')).getText()).toBe(
        `${expected!.leaves.map((l) => l.value.toFixed(2)).join(' + ')} mm`,
      );
      expect(await (await feelers.reading('Stack thickness')).getText()).toBe(`${printed(expected!.total, 'length', 'metric', 3)} mm`);
    });

    it('when a timed drop, a depth and a cutting rate are entered, then the library’s rate and times show', async () => {
      const { card } = await setUp();
      const descent = await card('Bow-arm descent and cut time');
      await descent.fill({ Drop: '100', 'Time taken': '50', 'Depth of cut': '60', 'Section area': '20', 'Cutting rate': '8' });

      const rate = descentRate({ distance: mm(100), time: { value: 50, unit: 's' } });
      expect(await (await descent.reading('Descent rate')).getText()).toBe(`${printed(rate, 'feedRate', 'metric', 2)} mm/s`);
      const through = descentTime({ distance: mm(60), rate });
      expect(await (await descent.reading('Time through the work')).getText()).toBe(`${valueIn(through, 'min').toFixed(2)} min`);
      const byArea = cutTime({ area: { value: 20, unit: 'cm^2' }, cuttingRate: { value: 8, unit: 'cm^2/min' } });
      const cut = await descent.reading('Cut time');
      expect(await cut.getText()).toBe(`${valueIn(byArea, 'min').toFixed(2)} min`);
      expect(await cut.getNote()).toBe(`${valueIn(byArea, 's').toFixed(0)} s`);
    });

    it('when some cuts have been made, then the library’s break-in area still to cut shows', async () => {
      const { card } = await setUp();
      const breakIn = await card('Blade break-in');
      await breakIn.fill({ 'Bar diameter': '50', 'Cuts made': '12' });

      const areaCut = totalCutArea({ cuts: [{ section: { shape: 'round', diameter: mm(50) }, count: 12 }] });
      const breakInArea = valueIn({ value: 100, unit: 'in^2' }, 'cm^2');
      expect(await breakIn.value('Break-in area')).toBe(String(Number(breakInArea.toPrecision(6))));
      const expected = breakInRemaining({ areaCut, breakInArea: { value: Number(breakInArea.toPrecision(6)), unit: 'cm^2' } });
      expect(await (await breakIn.reading('Still to cut')).getText()).toBe(`${printed(expected.remaining, 'area', 'metric', 0)} cm²`);
      expect(await (await breakIn.reading('Done')).getText()).toBe(`${expected.percentDone.toFixed(0)} %`);
    });
  });

  it('when the recommended speed is handed on, then the nearest-step card takes it', async () => {
    const { card } = await setUp();
    const rec = await card('Recommended blade speed');
    await rec.pick('Material', 'aluminium');
    await rec.fill({ 'Section size': '30' });
    await rec.click(/Find the nearest speed step/);

    const expected = recommendBladeSpeed({ material: 'aluminium', section: mm(30), blade: 'bi-metal', cutting: 'coolant' });
    const nearest = await card('Nearest speed step');
    expect(await nearest.value('Recommended speed')).toBe(printed(expected.speed, 'bladeSpeed', 'metric', 1));
  });

  it('when imperial is chosen, then fields and results convert and metric comes back as typed', async () => {
    const { card, units } = await setUp();
    const speed = await card('Blade speed from the pulleys');
    await speed.fill({ 'Motor speed': '1400', 'Driver pulley Ø': '60', 'Driven pulley Ø': '133', 'Gearbox ratio': '30', 'Wheel diameter': '300' });

    await (await units('Imperial')).check();
    expect(await speed.unitOf('Wheel diameter')).toBe('in');
    const wheel = await speed.value('Wheel diameter');
    expect(Number(wheel)).toBeCloseTo(valueIn(mm(300), 'in'), 4);
    const shown = {
      driverPulley: { value: Number(await speed.value('Driver pulley Ø')), unit: 'in' },
      drivenPulley: { value: Number(await speed.value('Driven pulley Ø')), unit: 'in' },
      wheelDiameter: { value: Number(wheel), unit: 'in' },
    };
    const expected = wheelSurfaceSpeed({ motorSpeed: { value: 1400, unit: 'rpm' }, gearboxRatio: 30, ...shown });
    const blade = await speed.reading('Blade speed');
    expect(await blade.getUnit()).toBe('ft/min');
    expect(await blade.getValue()).toBe(printed(expected.surfaceSpeed, 'bladeSpeed', 'imperial', 0));

    await (await units('Metric')).check();
    expect(await speed.value('Wheel diameter')).toBe('300');
    expect(await speed.unitOf('Wheel diameter')).toBe('mm');
  });

  it('when a person chooses imperial, then it is remembered for them on this device and not for someone else', async () => {
    const first = await setUp({ user: ELLIS });
    expect(await (await first.units('Metric')).isChecked()).toBeTrue();
    await (await first.units('Imperial')).check();
    expect(localStorage.getItem(unitChoiceKey(ELLIS.id))).toBe('imperial');

    TestBed.resetTestingModule();
    const again = await setUp({ user: ELLIS });
    expect(await (await again.units('Imperial')).isChecked()).toBeTrue();
    expect(await (await again.card('Drive belt')).unitOf('Pulley centres')).toBe('in');

    TestBed.resetTestingModule();
    const someoneElse = await setUp({ user: NIA });
    expect(await (await someoneElse.units('Metric')).isChecked()).toBeTrue();
    expect(localStorage.getItem(unitChoiceKey(NIA.id))).toBeNull();
  });

  it('when a machine is picked, then its wheel, pulley, gearbox, blade and belt figures fill the cards', async () => {
    const { loader, card } = await setUp({ machines: MACHINES });
    const picker = await (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Fill in from a machine' }))).getControl(MatSelectHarness);
    await picker!.open();
    await picker!.clickOptions({ text: /Bay 2 bandsaw/ });

    const speed = await card('Blade speed from the pulleys');
    expect(await speed.value('Motor speed')).toBe('1400');
    expect(await speed.value('Gearbox ratio')).toBe('30');
    expect(await speed.value('Wheel diameter')).toBe('300');
    expect(await speed.value('Driver pulley Ø')).toBe('60');
    expect(await speed.value('Driven pulley Ø')).toBe('133');
    const expected = wheelSurfaceSpeed({ motorSpeed: { value: 1400, unit: 'rpm' }, driverPulley: mm(60), drivenPulley: mm(133), gearboxRatio: 30, wheelDiameter: mm(300) });
    expect(await (await speed.reading('Blade speed')).getValue()).toBe(printed(expected.surfaceSpeed, 'bladeSpeed', 'metric', 1));

    await speed.pick('Belt on step', /Step 2/);
    expect(await speed.value('Driver pulley Ø')).toBe('80');
    expect(await speed.value('Driven pulley Ø')).toBe('111');

    const nearest = await card('Nearest speed step');
    expect(await nearest.value('Driver Ø', 1)).toBe('80');
    expect(await nearest.value('Driven Ø', 1)).toBe('111');

    const tension = await card('Blade tension');
    expect(await tension.value('Blade width')).toBe('27');
    expect(await tension.value('Blade thickness')).toBe('0.9');
    expect(await tension.isChosen('Gauge reads wheel load')).toBeTrue();
    expect(await (await tension.formField('Gauge reading')).getTextHints()).toEqual(['This saw: 700–900 kgf, wheel load']);

    const length = await card('Blade length and wheel centres');
    expect(await length.value('Wheel diameter')).toBe('300');
    expect(await length.value('Centre distance')).toBe('900');

    const belt = await card('Drive belt');
    expect(await belt.value('Pulley centres')).toBe('420');
    expect(await belt.value('Driver pulley Ø')).toBe('60');
  });

  it('when a figure is refused by the maths, then the reason shows on that field and no result is shown', async () => {
    const { card } = await setUp();
    const speed = await card('Blade speed from the pulleys');
    await speed.fill({ 'Motor speed': '1400', 'Driver pulley Ø': '60', 'Driven pulley Ø': '133', 'Gearbox ratio': '30', 'Wheel diameter': '-300' });
    expect(await speed.errorsOf('Wheel diameter')).toEqual(['Must be more than zero.']);
    expect(await speed.errorsOf('Motor speed')).toEqual([]);
    expect(await speed.hasReading('Blade speed')).toBeFalse();
    expect(await speed.text()).not.toContain('NaN');

    await speed.fill({ 'Wheel diameter': 'three hundred' });
    expect(await speed.errorsOf('Wheel diameter')).toEqual([
      'Wheel diameter: "three hundred" is not a plain number — type digits with at most one decimal point, such as 1200, 0.05 or -0.05 (no commas, spaces, letters or exponents).',
    ]);

    const belt = await card('Drive belt');
    await belt.fill({ 'Driver pulley Ø': '100', 'Driven pulley Ø': '400', 'Pulley centres': '120' });
    expect(await belt.errorsOf('Pulley centres')).toEqual(['Pulley centres must be more than half the sum of the pulley diameters, or the pulleys overlap.']);
    expect(await belt.hasReading('Target deflection')).toBeFalse();
  });

  describe('figures that can be trusted', () => {
    /** Figures each card works out from (the cards' own worked examples above), to start every case from. */
    const GOOD: Record<string, Record<string, string>> = {
      'Blade speed from the pulleys': { 'Motor speed': '1400', 'Driver pulley Ø': '60', 'Driven pulley Ø': '133', 'Gearbox ratio': '30', 'Wheel diameter': '300' },
      'Recommended blade speed': { 'Section size': '20' },
      'Tooth pitch': { Size: '25' },
      'Blade tension': { 'Blade width': '27', 'Blade thickness': '0.9', 'Gauge reading': '800' },
      'Blade length and wheel centres': { 'Wheel diameter': '300', 'Centre distance': '1000' },
      'Drive belt': { 'Driver pulley Ø': '150', 'Driven pulley Ø': '300', 'Pulley centres': '600' },
      'Squareness from a feeler gap': { 'Feeler gap': '0.05', 'Height of the square': '150', 'Allowed gap': '0.05', 'Over a length of': '100' },
      'Feeler stack': { 'Gap to make': '0.37' },
      'Bow-arm descent and cut time': { Drop: '100', 'Time taken': '50', 'Depth of cut': '60', 'Section area': '20', 'Cutting rate': '8' },
      'Blade break-in': { 'Bar diameter': '50', 'Cuts made': '12' },
    };
    const FIELDS = Object.entries(GOOD).flatMap(([heading, figures]) => Object.keys(figures).map((label) => [heading, label] as const));
    const plain = /^\s*[+-]?(\d+\.?\d*|\.\d+)\s*$/;

    it('when "1,200" or "0x4B0" is typed, then the field refuses it by name and no blade length is shown (never 1102 mm nor a hex 1200)', async () => {
      const { card } = await setUp();
      const length = await card('Blade length and wheel centres');
      await length.fill({ 'Wheel diameter': '300', 'Centre distance': '1,200' });
      expect((await length.errorsOf('Centre distance'))[0]).toMatch(/^Centre distance: "1,200" has a thousands separator/);
      expect(await length.hasReading('Blade length')).toBeFalse();
      await length.fill({ 'Centre distance': '0x4B0' });
      expect((await length.errorsOf('Centre distance'))[0]).toMatch(/^Centre distance: "0x4B0" is not a decimal number/);
      expect(await length.hasReading('Blade length')).toBeFalse();
      await length.fill({ 'Centre distance': '1200' });
      // US Navy training manual: L = π·D + 2·C = π·300 + 2400 = 3342.5 mm.
      expect(await (await length.reading('Blade length')).getText()).toBe('3342.5 mm');
    });

    it('when the gap is 0.1047 mm per 100 mm against an allowed 0.10, then it is "Outside" and the error shows 0.105, and a hair over shows its extra digits (CHECKS.md, Squareness: per-100-mm error = 100·g/h)', async () => {
      const { card } = await setUp();
      const square = await card('Squareness from a feeler gap');
      await square.fill({ 'Feeler gap': '0.1047', 'Height of the square': '100', 'Allowed gap': '0.10' });
      expect(await (await square.reading('Error')).getText()).toBe('0.105 mm per 100 mm');
      expect(await (await square.reading('Against your tolerance')).getValue()).toBe('Outside');
      await square.fill({ 'Feeler gap': '0.10004' });
      expect(await (await square.reading('Error')).getText()).toBe('0.10004 mm per 100 mm');
      expect(await (await square.reading('Against your tolerance')).getValue()).toBe('Outside');
    });

    it('when the gearbox ratio is blank, then the card waits for it by name rather than taking 1', async () => {
      const { card } = await setUp();
      const speed = await card('Blade speed from the pulleys');
      expect(await speed.value('Gearbox ratio')).toBe('1');
      await speed.fill({ ...GOOD['Blade speed from the pulleys'], 'Gearbox ratio': '' });
      expect(await speed.hasReading('Blade speed')).toBeFalse();
      expect(await speed.resultsText()).toContain('Enter the gearbox ratio (1 with no gearbox) to see the result.');
    });

    it('when 1e308 or a huge plain figure is typed, then the field names itself and no NaN, Infinity or e+ figure appears', async () => {
      const { card } = await setUp();
      const length = await card('Blade length and wheel centres');
      await length.fill({ 'Wheel diameter': '1e308', 'Centre distance': '1000' });
      expect((await length.errorsOf('Wheel diameter'))[0]).toContain('exponent');
      await length.fill({ 'Wheel diameter': '1' + '0'.repeat(300) });
      expect((await length.errorsOf('Wheel diameter'))[0]).toBe('Wheel diameter is beyond any workshop size (at most 100000 mm).');
      expect(await length.text()).not.toMatch(/NaN|Infinity|e\+/);
    });

    it('when the gap equals the square height, or belt centres let the pulleys overlap, then the figure is refused on its field', async () => {
      const { card } = await setUp();
      const square = await card('Squareness from a feeler gap');
      await square.fill({ 'Feeler gap': '100', 'Height of the square': '100' });
      expect((await square.errorsOf('Feeler gap'))[0]).toContain('at most a tenth of height of the square');
      expect(await square.hasReading('Out of square by')).toBeFalse();
      const belt = await card('Drive belt');
      await belt.fill({ 'Driver pulley Ø': '150', 'Driven pulley Ø': '300', 'Pulley centres': '225' });
      expect((await belt.errorsOf('Pulley centres'))[0]).toContain('or the pulleys overlap');
      expect(await belt.hasReading('Span')).toBeFalse();
    });

    it('when "35" is typed, the units are toggled and "0" is typed after, then the field still means 35 mm (converted, never re-read)', async () => {
      const { card, units } = await setUp();
      const length = await card('Blade length and wheel centres');
      await length.fill({ 'Wheel diameter': '300', 'Centre distance': '35' });
      await (await units('Imperial')).check();
      const input = await length.input('Centre distance');
      await (await input.host()).sendKeys('0');
      const text = await input.getValue();
      expect(Number(text) * 25.4).toBeCloseTo(35, 3);
      // Back in metric it is what was typed, not 1.37795 in re-read as 34.9999 mm.
      await (await units('Metric')).check();
      expect(await length.value('Centre distance')).toBe('35');
    });

    it('when an allowed gap over 100 mm is toggled to imperial, then the length converts exactly and the verdict stays the same', async () => {
      const { card, units } = await setUp();
      const square = await card('Squareness from a feeler gap');
      // 0.0995 mm per 100 mm is within 0.10 per 100 mm; 0.10 mm over 4 in (101.6 mm) would put it outside.
      await square.fill({ 'Feeler gap': '0.0995', 'Height of the square': '100', 'Allowed gap': '0.10' });
      expect(await (await square.reading('Against your tolerance')).getValue()).toBe('Within');
      await (await units('Imperial')).check();
      expect(Number(await square.value('Over a length of'))).toBeCloseTo(100 / 25.4, 4);
      expect(await (await square.reading('Against your tolerance')).getValue()).toBe('Within');
    });

    it('when a blank card shows its over-a-length field blank, then it asks in plain words', async () => {
      const { card } = await setUp();
      const square = await card('Squareness from a feeler gap');
      await square.fill({ 'Feeler gap': '0.05', 'Height of the square': '150', 'Allowed gap': '0.05', 'Over a length of': '' });
      const text = await square.resultsText();
      expect(text).toContain('Enter the length your allowed gap is measured over to see the verdict.');
      expect(text).not.toContain('Enter the over a length of');
    });

    it('when a tube is entered, then its cross-section area shows beside the average width of cut (CHECKS.md, Tooth pitch: 4 in × 3 in tube → π/4·(16−9) = 5.50 in²; ÷ 4 in = 1.3744 in, which CHECKS.md quotes from the rounded area as 1.375)', async () => {
      const { card, units } = await setUp();
      await (await units('Imperial')).check();
      const pitch = await card('Tooth pitch');
      await pitch.choose('Tube');
      await pitch.fill({ 'Outside Ø': '4', 'Inside Ø': '3' });
      expect(await (await pitch.reading('Cross-section area')).getText()).toBe('5.50 in²');
      expect(await (await pitch.reading('Width of cut')).getValue()).toBe('1.374');
    });

    it('when random text or numbers go into any figure field, then the card shows a finite result or the field a clear error — never a silent number', async () => {
      const { card } = await setUp();
      await (await card('Recommended blade speed')).pick('Material', '304 stainless steel');
      for (const [heading, figures] of Object.entries(GOOD)) await (await card(heading)).fill(figures);
      const texts = fc.oneof(
        fc.string({ maxLength: 10 }),
        fc.double({ noNaN: true }).map(String),
        fc.constantFrom('1,200', '0x4B0', '1e3', '12,5', '1 200', 'Infinity', '-', '.', '1e308', '9'.repeat(320)),
      );
      await fc.assert(
        fc.asyncProperty(fc.constantFrom(...FIELDS), texts, async ([heading, label], text) => {
          const c = await card(heading);
          await c.fill({ [label]: text });
          const errors = await c.errorsOf(label);
          const shown = await c.text();
          const ok = !/NaN|Infinity|e\+|e-\d/.test(await c.resultsText()) && (plain.test(text) || text.trim() === '' || errors.length > 0);
          await c.fill({ [label]: figures(heading, label) });
          return ok && shown.length > 0;
        }),
        { numRuns: 30 },
      );
      function figures(heading: string, label: string): string {
        return GOOD[heading]![label]!;
      }
    });
  });
});
