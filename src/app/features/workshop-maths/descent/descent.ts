import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { cutTime, descentRate, descentTime, type Quantity, type UnitSystem } from '@setwright/maths';
import { calculation, followUnits, formValue, qty, unitOf } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, shown, shownIn } from '../display';
import { WORKINGS } from '../formulas';

/** A time as minutes in large type, with the seconds beside it. */
function time(t: Quantity) {
  return { shown: shownIn(t, 'min', 2), note: `${shownIn(t, 's', 0).value} s` };
}

/** How fast the bow arm comes down, and how long a cut takes. */
@Component({
  selector: 'sw-descent',
  imports: [CARD_KIT],
  templateUrl: './descent.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Descent {
  readonly system = input.required<UnitSystem>();

  protected readonly form = inject(FormBuilder).nonNullable.group({
    distance: '',
    time: '',
    depth: '',
    area: '',
    cuttingRate: '',
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.distance, 'length'],
    [this.c.depth, 'length'],
    [this.c.area, 'area'],
    [this.c.cuttingRate, 'cuttingRate'],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly areaUnit = () => fieldUnit('area', this.units());
  protected readonly rateUnit = () => fieldUnit('cuttingRate', this.units());
  protected readonly working = WORKINGS.descent;
  private readonly value = formValue(this.form);

  protected readonly rate = calculation(
    () => {
      const v = this.value();
      const system = this.units();
      const rate = descentRate({ distance: qty(v.distance, unitOf('length', system)), time: qty(v.time, 's') });
      return { rate, shown: shown(rate, 'feedRate', system, { metric: 2, imperial: 2 }) };
    },
    {
      distance: { control: this.c.distance, label: 'Drop' },
      time: { control: this.c.time, label: 'Time taken' },
    },
  );

  protected readonly through = calculation(
    () => {
      const v = this.value();
      // Until a drop has been timed there is no rate; the library then reports it missing.
      const rate = this.rate.ready()?.rate as Quantity;
      return time(descentTime({ distance: qty(v.depth, unitOf('length', this.units())), rate }));
    },
    {
      distance: { control: this.c.depth, label: 'Depth of cut' },
      rate: { control: null, label: 'Descent rate', waiting: 'Time a drop above first.' },
    },
  );

  protected readonly byArea = calculation(
    () => {
      const v = this.value();
      const system = this.units();
      const area = qty(v.area, unitOf('area', system));
      return time(cutTime({ area, cuttingRate: qty(v.cuttingRate, unitOf('cuttingRate', system)) }));
    },
    {
      area: { control: this.c.area, label: 'Section area' },
      cuttingRate: { control: this.c.cuttingRate, label: 'Cutting rate' },
    },
  );
}
