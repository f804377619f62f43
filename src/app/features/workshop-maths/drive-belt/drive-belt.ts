import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { beltDeflectionTarget, beltSpan, openBeltLength, openBeltLengthExact, type UnitSystem } from '@setwright/maths';
import { calculation, fillFromMachine, followUnits, formValue, machineText, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, shown } from '../display';
import { WORKINGS } from '../formulas';
import type { MachineFigures } from '../machine-figures';

/** The V-belt's span and length, and how far it should press down at mid-span. */
@Component({
  selector: 'sw-drive-belt',
  imports: [CARD_KIT],
  templateUrl: './drive-belt.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DriveBelt {
  readonly system = input.required<UnitSystem>();
  readonly machine = input<MachineFigures | null>(null);

  protected readonly form = inject(FormBuilder).nonNullable.group({
    driverPulley: '',
    drivenPulley: '',
    centreDistance: '',
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.driverPulley, 'length'],
    [this.c.drivenPulley, 'length'],
    [this.c.centreDistance, 'length'],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly working = WORKINGS.driveBelt;
  protected readonly step = signal<number | null>(null);
  private readonly value = formValue(this.form);

  /** The machine's own deflection figure, for comparison. */
  protected readonly machineDeflection = computed(() => {
    const d = this.machine()?.beltDeflectionMm;
    if (d === undefined) return '';
    return `This saw’s figure: ${machineText(d, 'mm', 'length', this.units())} ${fieldUnit('length', this.units())}`;
  });

  private readonly fields: Fields = {
    driverPulley: { control: this.c.driverPulley, label: 'Driver pulley Ø' },
    drivenPulley: { control: this.c.drivenPulley, label: 'Driven pulley Ø' },
    centreDistance: { control: this.c.centreDistance, label: 'Pulley centres' },
  };

  protected readonly belt = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const pair = {
      driverPulley: qty(v.driverPulley, length),
      drivenPulley: qty(v.drivenPulley, length),
      centreDistance: qty(v.centreDistance, length),
    };
    const span = beltSpan(pair);
    return {
      deflection: shown(beltDeflectionTarget({ span }), 'length', system, { metric: 1, imperial: 3 }),
      span: shown(span, 'length', system, { metric: 1, imperial: 2 }),
      length: shown(openBeltLength(pair), 'length', system, { metric: 1, imperial: 2 }),
      exact: shown(openBeltLengthExact(pair), 'length', system, { metric: 1, imperial: 2 }),
    };
  }, this.fields);

  constructor() {
    effect(() => {
      const m = this.machine();
      untracked(() => {
        this.step.set(m?.speedSteps.length ? 0 : null);
        if (!m) return;
        const first = m.speedSteps[0];
        fillFromMachine(
          this.form,
          {
            centreDistance: [m.beltCentreDistanceMm, 'mm', 'length'],
            driverPulley: [first?.driverMm, 'mm', 'length'],
            drivenPulley: [first?.drivenMm, 'mm', 'length'],
          },
          this.units(),
        );
      });
    });
  }

  /** Puts the belt on another of the machine's steps. */
  protected useStep(index: number): void {
    const s = this.machine()?.speedSteps[index];
    if (!s) return;
    this.step.set(index);
    const pulleys = { driverPulley: [s.driverMm, 'mm', 'length'], drivenPulley: [s.drivenMm, 'mm', 'length'] } as const;
    fillFromMachine(this.form, pulleys, this.units());
  }
}
