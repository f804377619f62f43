import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { FormBuilder } from '@angular/forms';
import { feelerStack, typicalMetricFeelerSet, type UnitSystem } from '@setwright/maths';
import { calculation, followUnits, formValue, qty, unitOf, type Fields } from '../calculation';
import { CARD_KIT } from '../card-kit';
import { fieldUnit, fixed, shown, unitText } from '../display';
import { WORKINGS } from '../formulas';

/** The set the library picks leaves from, as printed on the card. */
const SET_TEXT = `${typicalMetricFeelerSet.map((l) => fixed(l.value, 2)).join(', ')} ${unitText(
  typicalMetricFeelerSet[0]?.unit ?? 'mm',
)}`;

/** Which feeler leaves to stack for a gap. */
@Component({
  selector: 'sw-feeler-stack',
  imports: [CARD_KIT],
  templateUrl: './feeler-stack.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FeelerStack {
  readonly system = input.required<UnitSystem>();

  protected readonly setText = SET_TEXT;
  protected readonly form = inject(FormBuilder).nonNullable.group({
    target: '',
    tolerance: '0.005',
  });
  protected readonly c = this.form.controls;
  protected readonly units = followUnits(this.system, () => [
    [this.c.target, 'length'],
    [this.c.tolerance, 'length', { metric: '0.005', imperial: '0.0002' }],
  ]);
  protected readonly lengthUnit = () => fieldUnit('length', this.units());
  protected readonly working = WORKINGS.feelerStack;
  private readonly value = formValue(this.form);

  private readonly fields: Fields = {
    target: { control: this.c.target, label: 'Gap to make' },
    tolerance: { control: this.c.tolerance, label: 'Within' },
  };

  protected readonly stack = calculation(() => {
    const v = this.value();
    const system = this.units();
    const length = unitOf('length', system);
    const r = feelerStack({ target: qty(v.target, length), tolerance: qty(v.tolerance, length) });
    const decimals = { metric: 3, imperial: 4 };
    if (r === null) return { found: false as const };
    const off = shown(r.error, 'length', system, decimals);
    return {
      found: true as const,
      leaves: { value: r.leaves.map((l) => fixed(l.value, 2)).join(' + '), unit: unitText(r.leaves[0]?.unit ?? 'mm') },
      count: r.leaves.length,
      total: shown(r.total, 'length', system, decimals),
      off: { ...off, value: r.error.value > 0 ? `+${off.value}` : off.value },
    };
  }, this.fields);
}
