import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { squarenessError, textBeside, valueIn, type UnitSystem } from '@setwright/maths';
import { calculation, followUnits, formValue, optionalQty, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, fixed, type Shown } from '../display';
import { WORKINGS } from '../formulas';

/** How far the blade is out of square, from the gap a feeler finds at the top of a square. */
@Component({
  selector: 'sw-squareness',
  imports: [CARD_KIT],
  templateUrl: './squareness.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Squareness {
  readonly system = input.required<UnitSystem>();

  protected readonly form = inject(FormBuilder).nonNullable.group({
    gap: '',
    squareHeight: '',
    allowedGap: '',
    over: '100',
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.gap, 'length'],
    [this.c.squareHeight, 'length'],
    [this.c.allowedGap, 'length'],
    // 100 mm ↔ 4 in only while no allowed gap is typed: after that the tolerance keeps its exact basis.
    [this.c.over, 'length', { metric: '100', imperial: '4' }, () => this.c.allowedGap.value.trim() === ''],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly working = WORKINGS.squareness;
  private readonly value = formValue(this.form);

  private readonly fields: Fields = {
    gap: { control: this.c.gap, label: 'Feeler gap' },
    squareHeight: { control: this.c.squareHeight, label: 'Height of the square' },
    'tolerance.gap': { control: this.c.allowedGap, label: 'Allowed gap' },
    'tolerance.over': {
      control: this.c.over,
      label: 'Over a length of',
      waiting: 'Enter the length your allowed gap is measured over to see the verdict.',
    },
  };

  protected readonly square = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const allowed = optionalQty(v.allowedGap, length);
    const r = squarenessError({
      gap: qty(v.gap, length),
      squareHeight: qty(v.squareHeight, length),
      tolerance: allowed === undefined ? undefined : { gap: allowed, over: qty(v.over, length) },
    });
    // The tolerance as the same slope; the error shows enough decimals never to look equal to it when it is not.
    const allowedSlope = allowed === undefined ? undefined : valueIn(allowed, length) / Number(qty(v.over, length).value);
    const error: Shown =
      system === 'metric'
        ? { value: textBeside(valueIn(r.errorPer100mm, 'mm'), 3, [allowedSlope === undefined ? undefined : allowedSlope * 100]), unit: 'mm per 100 mm' }
        : { value: textBeside(r.slope, 5, [allowedSlope]), unit: 'in per inch' };
    return {
      angle: { value: `${r.degreesMinutes.degrees}° ${fixed(r.degreesMinutes.minutes, 1)}′`, unit: '' },
      degrees: fixed(r.degrees, 3),
      error,
      pass: r.pass,
    };
  }, this.fields);
}
