import { ChangeDetectionStrategy, Component, effect, inject, input, signal, untracked } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { wheelSurfaceSpeed, type UnitSystem } from '@setwright/maths';
import { calculation, fillFromMachine, requiredFigure, followUnits, formValue, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, shown } from '../display';
import { WORKINGS } from '../formulas';
import type { MachineFigures } from '../machine-figures';

/** Blade speed from the motor, the belt's pulleys, the gearbox and the wheel. */
@Component({
  selector: 'sw-pulley-speed',
  imports: [CARD_KIT],
  templateUrl: './pulley-speed.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PulleySpeed {
  readonly system = input.required<UnitSystem>();
  readonly machine = input<MachineFigures | null>(null);

  protected readonly form = inject(FormBuilder).nonNullable.group({
    motorSpeed: '',
    driverPulley: '',
    drivenPulley: '',
    gearboxRatio: '1',
    wheelDiameter: '',
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.driverPulley, 'length'],
    [this.c.drivenPulley, 'length'],
    [this.c.wheelDiameter, 'length'],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly working = WORKINGS.pulleySpeed;
  protected readonly step = signal<number | null>(null);
  private readonly value = formValue(this.form);

  private readonly fields: Fields = {
    motorSpeed: { control: this.c.motorSpeed, label: 'Motor speed' },
    driverPulley: { control: this.c.driverPulley, label: 'Driver pulley Ø' },
    drivenPulley: { control: this.c.drivenPulley, label: 'Driven pulley Ø' },
    gearboxRatio: {
      control: this.c.gearboxRatio,
      label: 'Gearbox ratio',
      waiting: 'Enter the gearbox ratio (1 with no gearbox) to see the result.',
    },
    wheelDiameter: { control: this.c.wheelDiameter, label: 'Wheel diameter' },
  };

  protected readonly speed = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const r = wheelSurfaceSpeed({
      motorSpeed: qty(v.motorSpeed, 'rpm'),
      driverPulley: qty(v.driverPulley, length),
      drivenPulley: qty(v.drivenPulley, length),
      gearboxRatio: requiredFigure(v.gearboxRatio) as number,
      wheelDiameter: qty(v.wheelDiameter, length),
    });
    return {
      blade: shown(r.surfaceSpeed, 'bladeSpeed', system, { metric: 1, imperial: 0 }),
      wheel: shown(r.wheelSpeed, 'wheelSpeed', system, 1),
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
            motorSpeed: [m.motorRpm],
            gearboxRatio: [m.gearboxRatio],
            wheelDiameter: [m.wheelDiameterMm, 'mm', 'length'],
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
