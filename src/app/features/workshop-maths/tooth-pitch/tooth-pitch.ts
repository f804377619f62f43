import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { sectionArea, toothPitch, type PitchChoice, type PitchSection, type UnitSystem } from '@setwright/maths';
import { calculation, followUnits, formValue, optionalQty, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, fixed, shown } from '../display';
import { WORKINGS } from '../formulas';

type Shape = PitchSection['shape'];

/** Teeth per inch for the work: enough teeth in the cut, not so many they clog. */
@Component({
  selector: 'sw-tooth-pitch',
  imports: [CARD_KIT],
  templateUrl: './tooth-pitch.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ToothPitch {
  readonly system = input.required<UnitSystem>();

  protected readonly form = inject(FormBuilder).nonNullable.group({
    shape: 'solid' as Shape,
    size: '',
    outside: '',
    inside: '',
    wall: '',
    area: '',
    travel: '',
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.size, 'length'],
    [this.c.outside, 'length'],
    [this.c.inside, 'length'],
    [this.c.wall, 'length'],
    [this.c.area, 'area'],
    [this.c.travel, 'length'],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly areaUnit = () => fieldUnit('area', this.units());
  protected readonly working = WORKINGS.toothPitch;
  protected readonly value = formValue(this.form);

  private readonly fields: Fields = {
    'section.size': { control: this.c.size, label: 'Size' },
    'section.outside': { control: this.c.outside, label: 'Outside Ø' },
    'section.inside': {
      control: this.c.inside,
      label: 'Inside Ø',
      waiting: 'Enter the inside Ø or the wall to see the result.',
    },
    'section.wall': { control: this.c.wall, label: 'Wall' },
    'section.area': { control: this.c.area, label: 'Section area' },
    'section.travel': { control: this.c.travel, label: 'Blade travel' },
  };

  protected readonly pitch = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const section: PitchSection =
      v.shape === 'solid'
        ? { shape: 'solid', size: qty(v.size, length) }
        : v.shape === 'tube'
          ? {
              shape: 'tube',
              outside: qty(v.outside, length),
              inside: optionalQty(v.inside, length),
              wall: optionalQty(v.wall, length),
            }
          : { shape: 'structural', area: qty(v.area, unitOf('area', system)), travel: qty(v.travel, length) };
    const r = toothPitch({ section });
    const choice = (p: PitchChoice) => {
      const spacing = shown(p.pitch, 'length', system, { metric: 2, imperial: 3 });
      const outside = p.withinRange ? '' : ' · outside the range';
      return {
        label: { value: p.label, unit: 'TPI' },
        note: `${fixed(p.teethInCut, 1)} teeth in the cut · tooth spacing ${spacing.value} ${spacing.unit}${outside}`,
      };
    };
    return {
      // A tube's width of cut is its area ÷ its outside Ø: the area is shown beside it to check by hand.
      area: section.shape === 'tube' ? shown(sectionArea(section), 'area', system, 2) : null,
      width: shown(r.widthOfCut, 'length', system, { metric: 1, imperial: 3 }),
      range: { value: `${fixed(r.minTpi, 1)}–${fixed(r.maxTpi, 1)}`, unit: 'TPI' },
      constant: choice(r.constant),
      variable: choice(r.variable),
      allowedConstant: r.allowedConstant.join(', '),
      allowedVariable: r.allowedVariable.join(', '),
    };
  }, this.fields);
}
