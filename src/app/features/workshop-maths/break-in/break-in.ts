import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import {
  breakInAreaRange,
  breakInRemaining,
  defaultBreakInArea,
  totalCutArea,
  type CutSection,
  type UnitSystem,
} from '@setwright/maths';
import { calculation, convertedText, followUnits, requiredFigure, formValue, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, fixed, shown } from '../display';
import { WORKINGS } from '../formulas';

type Shape = 'round' | 'rectangle';

/** How much more a new blade should cut at reduced feed before it is run in. */
@Component({
  selector: 'sw-break-in',
  imports: [CARD_KIT],
  templateUrl: './break-in.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BreakIn {
  readonly system = input.required<UnitSystem>();

  protected readonly form = inject(FormBuilder).nonNullable.group({
    shape: 'round' as Shape,
    diameter: '',
    width: '',
    height: '',
    cuts: '0',
    breakInArea: convertedText(defaultBreakInArea.value, defaultBreakInArea.unit, unitOf('area', 'metric')),
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.diameter, 'length'],
    [this.c.width, 'length'],
    [this.c.height, 'length'],
    [this.c.breakInArea, 'area'],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly areaUnit = () => fieldUnit('area', this.units());
  protected readonly working = WORKINGS.breakIn;
  protected readonly value = formValue(this.form);

  /** The makers' usual range, in the units shown. */
  protected readonly rangeHint = () => {
    const system = this.units();
    const low = shown(breakInAreaRange.low, 'area', system, 0);
    const high = shown(breakInAreaRange.high, 'area', system, 0);
    return `Blade makers suggest ${low.value}–${high.value} ${high.unit}`;
  };

  private readonly fields: Fields = {
    'cuts[0].section.diameter': { control: this.c.diameter, label: 'Bar diameter' },
    'cuts[0].section.width': { control: this.c.width, label: 'Width' },
    'cuts[0].section.height': { control: this.c.height, label: 'Height' },
    'cuts[0].count': { control: this.c.cuts, label: 'Cuts made' },
    breakInArea: { control: this.c.breakInArea, label: 'Break-in area' },
  };

  protected readonly progress = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const section: CutSection =
      v.shape === 'round'
        ? { shape: 'round', diameter: qty(v.diameter, length) }
        : { shape: 'rectangle', width: qty(v.width, length), height: qty(v.height, length) };
    // An empty count would read as one cut to the library; ask for the number instead (null is missing).
    const areaCut = totalCutArea({ cuts: [{ section, count: requiredFigure(v.cuts) as number }] });
    const r = breakInRemaining({ areaCut, breakInArea: qty(v.breakInArea, unitOf('area', system)) });
    return {
      remaining: shown(r.remaining, 'area', system, 0),
      areaCut: shown(r.areaCut, 'area', system, 0),
      done: { value: fixed(r.percentDone, 0), unit: '%' },
      complete: r.complete,
      feed: r.complete
        ? 'Normal feed — bring it up gradually.'
        : `About ${fixed(r.feedFraction * 100, 0)} % of normal feed until the area is cut.`,
    };
  }, this.fields);
}
