import { ChangeDetectionStrategy, Component, inject, input, output } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import {
  defaultBladeSpeedTable,
  recommendBladeSpeed,
  type BladeType,
  type Cutting,
  type Quantity,
  type UnitSystem,
} from '@setwright/maths';
import { calculation, followUnits, formValue, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, shown, signed, sourceText, type Shown } from '../display';
import { WORKINGS } from '../formulas';

/** "48.8–68.3 m/min"; none when both ends print the same (no dry-cutting range applies). */
function rangeOf(low: Shown, high: Shown): Shown | null {
  return low.value === high.value ? null : { value: `${low.value}–${high.value}`, unit: high.unit };
}

/** The materials the library's speed table holds, by key and name. */
const MATERIALS = defaultBladeSpeedTable.rows.map((r) => ({ key: r.material, name: r.name }));

/** A starting blade speed for the material, its size, the blade and whether coolant is used, with where it comes from. */
@Component({
  selector: 'sw-recommended-speed',
  imports: [CARD_KIT],
  templateUrl: './recommended-speed.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RecommendedSpeed {
  readonly system = input.required<UnitSystem>();
  /** Hands the recommended speed on (to the nearest-step card). */
  readonly useSpeed = output<Quantity>();

  protected readonly materials = MATERIALS;
  protected readonly form = inject(FormBuilder).nonNullable.group({
    material: '',
    section: '',
    blade: 'bi-metal' as BladeType,
    cutting: 'coolant' as Cutting,
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [[this.c.section, 'length']]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly working = WORKINGS.recommendedSpeed;
  private readonly value = formValue(this.form);

  private readonly fields: Fields = {
    material: { control: this.c.material, label: 'Material', waiting: 'Choose the material to see the result.' },
    section: { control: this.c.section, label: 'Section size' },
    blade: { control: this.c.blade, label: 'Blade' },
    cutting: { control: this.c.cutting, label: 'Cutting' },
  };

  protected readonly recommendation = calculation(() => {
    const v = this.value();
    const system = this.units();
    const r = recommendBladeSpeed({
      material: v.material,
      section: qty(v.section, unitOf('length', system)),
      blade: v.blade,
      cutting: v.cutting,
    });
    const speed = (q: Quantity) => shown(q, 'bladeSpeed', system, { metric: 1, imperial: 0 });
    return {
      speed: r.speed,
      middle: speed(r.speed),
      range: rangeOf(speed(r.low), speed(r.high)),
      row: r.basis.row,
      tableSpeed: speed(r.basis.tableSpeed),
      adjustments: r.basis.adjustments.map((a) => ({
        name: a.name,
        change:
          a.percentLow === a.percentHigh
            ? `${signed(a.percentLow, 1)} %`
            : `${signed(a.percentLow, 1)} to ${signed(a.percentHigh, 1)} %`,
      })),
      notes: r.basis.notes,
      source: sourceText(r.basis.source),
      summary: r.basis.summary,
    };
  }, this.fields);
}
