import { ChangeDetectionStrategy, Component, effect, ElementRef, inject, input, untracked } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { nearestSpeedStep, speedSteps, type Quantity, type SpeedTable, type UnitSystem } from '@setwright/maths';
import {
  calculation,
  requiredFigure,
  fillFromMachine,
  followUnits,
  formValue,
  machineText,
  qty,
  unitOf,
  type Fields,
} from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, fixed, shown } from '../display';
import { WORKINGS } from '../formulas';
import type { MachineFigures } from '../machine-figures';

/** Blade speeds print to 0.1 m/min or 1 ft/min, as on the speed cards. */
const SPEED_DECIMALS = { metric: 1, imperial: 0 } as const;

/** Which of the machine's speed steps comes nearest a recommended blade speed. */
@Component({
  selector: 'sw-nearest-step',
  imports: [CARD_KIT],
  templateUrl: './nearest-step.html',
  styleUrl: './nearest-step.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NearestStep {
  readonly system = input.required<UnitSystem>();
  readonly machine = input<MachineFigures | null>(null);

  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly fb = inject(FormBuilder).nonNullable;
  protected readonly form = this.fb.group({
    recommended: '',
    notFaster: false,
    motorSpeed: '',
    gearboxRatio: '1',
    wheelDiameter: '',
    steps: this.fb.array([this.stepRow('1')]),
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.recommended, 'bladeSpeed'],
    [this.c.wheelDiameter, 'length'],
    ...this.c.steps.controls.flatMap((s) => [
      [s.controls.driver, 'length'] as const,
      [s.controls.driven, 'length'] as const,
    ]),
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly speedUnit = () => fieldUnit('bladeSpeed', this.units());
  protected readonly working = WORKINGS.nearestStep;
  private readonly value = formValue(this.form);

  /** Library argument names → fields; the steps' names follow the rows on screen. */
  private readonly fields = (): Fields => {
    const fields: Record<string, Fields[string]> = {
      recommended: { control: this.c.recommended, label: 'Recommended speed' },
      motorSpeed: { control: this.c.motorSpeed, label: 'Motor speed' },
      gearboxRatio: {
      control: this.c.gearboxRatio,
      label: 'Gearbox ratio',
      waiting: 'Enter the gearbox ratio (1 with no gearbox) to see the result.',
    },
      wheelDiameter: { control: this.c.wheelDiameter, label: 'Wheel diameter' },
      steps: { control: null, label: 'Steps', waiting: 'Add at least one speed step.' },
    };
    this.c.steps.controls.forEach((row, i) => {
      const name = `step ${row.controls.label.value || i + 1}`;
      fields[`steps[${i}].driverPulley`] = { control: row.controls.driver, label: `Driver pulley Ø for ${name}` };
      fields[`steps[${i}].drivenPulley`] = { control: row.controls.driven, label: `Driven pulley Ø for ${name}` };
    });
    return fields;
  };

  protected readonly nearest = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const table: SpeedTable = {
      motorSpeed: qty(v.motorSpeed, 'rpm'),
      wheelDiameter: qty(v.wheelDiameter, length),
      gearboxRatio: requiredFigure(v.gearboxRatio) as number,
      steps: v.steps.map((s, i) => ({
        label: s.label || `${i + 1}`,
        driverPulley: qty(s.driver, length),
        drivenPulley: qty(s.driven, length),
      })),
    };
    const r = nearestSpeedStep({ table, recommended: qty(v.recommended, unitOf('bladeSpeed', system)), notFaster: v.notFaster });
    const speed = (q: Quantity) => shown(q, 'bladeSpeed', system, SPEED_DECIMALS);
    const pct = r.differencePercent;
    return {
      step: { value: r.step.label, unit: '' },
      speed: speed(r.step.surfaceSpeed),
      difference: { value: fixed(Math.abs(pct), 1), unit: pct > 0 ? '% faster' : pct < 0 ? '% slower' : '% — matches' },
      rule:
        r.rule === 'nearest'
          ? 'The step nearest the recommendation.'
          : r.rule === 'fastest-not-over'
            ? 'The fastest step that is not faster than the recommendation.'
            : 'Every step is faster than the recommendation; this is the slowest.',
      chosen: r.step.index,
      all: speedSteps(table).map((s) => ({ index: s.index, label: s.label, speed: speed(s.surfaceSpeed) })),
    };
  }, this.fields);

  constructor() {
    effect(() => {
      const m = this.machine();
      if (!m) return;
      untracked(() => {
        const system = this.units();
        const figures = {
          motorSpeed: [m.motorRpm],
          gearboxRatio: [m.gearboxRatio],
          wheelDiameter: [m.wheelDiameterMm, 'mm', 'length'],
        } as const;
        fillFromMachine(this.form, figures, system);
        if (m.speedSteps.length === 0) return;
        this.c.steps.clear({ emitEvent: false });
        for (const s of m.speedSteps) {
          const row = this.stepRow(s.label);
          row.setValue({
            label: s.label,
            driver: machineText(s.driverMm, 'mm', 'length', system),
            driven: machineText(s.drivenMm, 'mm', 'length', system),
          });
          this.c.steps.push(row, { emitEvent: false });
        }
        this.form.updateValueAndValidity();
      });
    });
  }

  protected addStep(): void {
    this.c.steps.push(this.stepRow(`${this.c.steps.length + 1}`));
  }

  protected removeStep(index: number): void {
    this.c.steps.removeAt(index);
  }

  /** Takes a recommended speed from the speed card, as that card prints it, and brings this card into view. */
  useRecommended(speed: Quantity): void {
    this.c.recommended.setValue(shown(speed, 'bladeSpeed', this.units(), SPEED_DECIMALS).value);
    this.host.nativeElement.scrollIntoView?.({ behavior: 'smooth', block: 'start' });
    this.host.nativeElement.querySelector('h2')?.focus({ preventScroll: true });
  }

  private stepRow(label: string) {
    return this.fb.group({ label, driver: '', driven: '' });
  }
}
