import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, untracked } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormBuilder } from '@angular/forms';
import { map } from 'rxjs';
import {
  bladeStress,
  forceForStress,
  gaugeReadingFor,
  judgeBladeStress,
  steelModulus,
  stressFromStretch,
  valueIn,
  type BladeSteel,
  type BladeType,
  type GaugeReads,
  type Quantity,
  type UnitSystem,
} from '@setwright/maths';
import { calculation, fillFromMachine, followUnits, formValue, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, fixed, shown, shownIn, sourceText, type Shown } from '../display';
import { WORKINGS } from '../formulas';
import type { MachineFigures } from '../machine-figures';

type Mode = 'reading' | 'target' | 'stretch';

const STEELS = (Object.keys(steelModulus) as BladeSteel[]).map((key) => ({ key, name: steelModulus[key].name }));
const BLADE_WORDS: Record<BladeType, string> = { 'bi-metal': 'bi-metal', carbon: 'carbon-steel' };

/** Blade tension three ways, each judged against the usual stress for the blade type. */
@Component({
  selector: 'sw-blade-tension',
  imports: [CARD_KIT],
  templateUrl: './blade-tension.html',
  styleUrl: './blade-tension.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BladeTension {
  readonly system = input.required<UnitSystem>();
  readonly machine = input<MachineFigures | null>(null);

  protected readonly steels = STEELS;
  /** On a phone the long choices stack rather than run off the card. */
  protected readonly narrow = toSignal(inject(BreakpointObserver).observe('(max-width: 520px)').pipe(map((s) => s.matches)), {
    initialValue: false,
  });
  protected readonly form = inject(FormBuilder).nonNullable.group({
    mode: 'reading' as Mode,
    blade: 'bi-metal' as BladeType,
    width: '',
    thickness: '',
    reading: '',
    reads: 'wheel-load' as GaugeReads,
    target: '',
    elongation: '',
    gaugeLength: '',
    steel: 'carbon-steel' as BladeSteel,
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.width, 'length'],
    [this.c.thickness, 'length'],
    [this.c.reading, 'tension'],
    [this.c.target, 'stress'],
    [this.c.elongation, 'length'],
    [this.c.gaugeLength, 'length'],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly forceUnit = () => fieldUnit('tension', this.units());
  protected readonly stressUnit = () => fieldUnit('stress', this.units());
  protected readonly working = WORKINGS.bladeTension;
  protected readonly value = formValue(this.form);

  /** The machine's own tension range, as a hint beside the reading. */
  protected readonly machineRange = computed(() => {
    const range = this.machine()?.tensionRangeKgf;
    if (!range) return '';
    const system = this.units();
    const readsAs = this.machine()?.tensionReads;
    const reads = readsAs === 'strand' ? 'one strand' : readsAs === 'wheel-load' ? 'wheel load' : 'gauge';
    const min = shown({ value: range.min, unit: 'kgf' }, 'tension', system, 0);
    const max = shown({ value: range.max, unit: 'kgf' }, 'tension', system, 0);
    return `This saw: ${min.value}–${max.value} ${max.unit}, ${reads}`;
  });

  private readonly fields: Fields = {
    force: { control: this.c.reading, label: 'Gauge reading' },
    reads: { control: this.c.reads, label: 'What the gauge reads' },
    width: { control: this.c.width, label: 'Blade width' },
    thickness: { control: this.c.thickness, label: 'Blade thickness' },
    stress: { control: this.c.target, label: 'Target stress' },
    elongation: { control: this.c.elongation, label: 'Stretch' },
    gaugeLength: { control: this.c.gaugeLength, label: 'Gauge length' },
    steel: { control: this.c.steel, label: 'Blade backing steel' },
    blade: { control: this.c.blade, label: 'Blade type' },
  };

  protected readonly tension = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const stressShown = (q: Quantity) => shown(q, 'stress', system, { metric: 1, imperial: 0 });
    const force = (q: Quantity) => shown(q, 'tension', system, 1);
    let stress: Quantity;
    let readings: { label: string; shown: Shown; large?: boolean }[];
    if (v.mode === 'reading') {
      const r = bladeStress({
        force: qty(v.reading, unitOf('tension', system)),
        reads: v.reads,
        width: qty(v.width, length),
        thickness: qty(v.thickness, length),
      });
      stress = r.stress;
      readings = [
        { label: 'Stress in the blade', shown: stressShown(r.stress), large: true },
        { label: 'Tension in each strand', shown: force(r.strandForce) },
      ];
    } else if (v.mode === 'target') {
      stress = qty(v.target, unitOf('stress', system));
      const r = forceForStress({ stress, width: qty(v.width, length), thickness: qty(v.thickness, length) });
      const gauge = gaugeReadingFor({ strandForce: r.strandForce, reads: v.reads });
      readings = [
        {
          label: v.reads === 'wheel-load' ? 'Gauge reading (wheel load)' : 'Gauge reading (one strand)',
          shown: force(gauge),
          large: true,
        },
        v.reads === 'wheel-load'
          ? { label: 'Tension in each strand', shown: force(r.strandForce) }
          : { label: 'Load on the wheel', shown: force(r.wheelLoad) },
      ];
    } else {
      const r = stressFromStretch({
        elongation: qty(v.elongation, length),
        gaugeLength: qty(v.gaugeLength, length),
        steel: v.steel,
      });
      stress = r.stress;
      // E is quoted in GPa, or in millions of psi as imperial tables print it.
      const modulus: Shown =
        system === 'metric'
          ? shownIn(r.modulus, 'GPa', 0)
          : { value: fixed(valueIn(r.modulus, 'psi') / 1e6, 1), unit: '× 10⁶ psi' };
      readings = [
        { label: 'Stress in the blade', shown: stressShown(r.stress), large: true },
        { label: 'Stiffness (E) used', shown: modulus },
      ];
    }
    const j = judgeBladeStress({ stress, blade: v.blade });
    const low = stressShown(j.target.low);
    const high = stressShown(j.target.high);
    const limit = stressShown(j.limit);
    const usual = `${low.value}–${high.value} ${high.unit}`;
    const blade = BLADE_WORDS[v.blade];
    const words = {
      low: `Below the usual ${usual} for a ${blade} blade. A slack blade can wander off line.`,
      within: `Within the usual ${usual} for a ${blade} blade.`,
      high: `Above the usual ${usual} for a ${blade} blade. Check the figures with a competent person before cutting.`,
      'over-limit':
        `Past the ${limit.value} ${limit.unit} a blade should never reach. ` +
        'Ease the tension off and check the figures with a competent person.',
    } as const;
    return { readings, verdict: j.verdict, judgement: words[j.verdict], source: sourceText(j.source) };
  }, this.fields);

  constructor() {
    effect(() => {
      const m = this.machine();
      if (!m) return;
      untracked(() => {
        const blade = { width: [m.bladeWidthMm, 'mm', 'length'], thickness: [m.bladeThicknessMm, 'mm', 'length'] } as const;
        fillFromMachine(this.form, blade, this.units());
        if (m.tensionReads) this.c.reads.setValue(m.tensionReads);
      });
    });
  }
}
