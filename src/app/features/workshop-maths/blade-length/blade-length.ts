import { ChangeDetectionStrategy, Component, effect, inject, input, untracked } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { bladeLength, centreDistanceForBlade, type UnitSystem } from '@setwright/maths';
import { calculation, fillFromMachine, followUnits, formValue, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, shown } from '../display';
import { WORKINGS } from '../formulas';
import type { MachineFigures } from '../machine-figures';

type Mode = 'length' | 'centres';

/** Blade length from the wheels and their centres, or the centres a blade needs. */
@Component({
  selector: 'sw-blade-length',
  imports: [CARD_KIT],
  templateUrl: './blade-length.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BladeLength {
  readonly system = input.required<UnitSystem>();
  readonly machine = input<MachineFigures | null>(null);

  protected readonly form = inject(FormBuilder).nonNullable.group({
    mode: 'length' as Mode,
    wheelDiameter: '',
    centreDistance: '',
    bladeLength: '',
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.wheelDiameter, 'length'],
    [this.c.centreDistance, 'length'],
    [this.c.bladeLength, 'length'],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly working = WORKINGS.bladeLength;
  protected readonly value = formValue(this.form);

  private readonly fields: Fields = {
    wheelDiameter: { control: this.c.wheelDiameter, label: 'Wheel diameter' },
    centreDistance: { control: this.c.centreDistance, label: 'Centre distance' },
    bladeLength: { control: this.c.bladeLength, label: 'Blade length' },
  };

  protected readonly answer = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const decimals = { metric: 1, imperial: 2 };
    if (v.mode === 'length') {
      const l = bladeLength({ wheelDiameter: qty(v.wheelDiameter, length), centreDistance: qty(v.centreDistance, length) });
      return { label: 'Blade length', shown: shown(l, 'length', system, decimals) };
    }
    const c = centreDistanceForBlade({ bladeLength: qty(v.bladeLength, length), wheelDiameter: qty(v.wheelDiameter, length) });
    return { label: 'Centre distance', shown: shown(c, 'length', system, decimals) };
  }, this.fields);

  constructor() {
    effect(() => {
      const m = this.machine();
      if (!m) return;
      untracked(() =>
        fillFromMachine(
          this.form,
          {
            wheelDiameter: [m.wheelDiameterMm, 'mm', 'length'],
            centreDistance: [m.centreDistanceMm, 'mm', 'length'],
            bladeLength: [m.bladeLengthMm, 'mm', 'length'],
          },
          this.units(),
        ),
      );
    });
  }
}
