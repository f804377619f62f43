import { ComponentHarness, HarnessPredicate, type BaseHarnessFilters } from '@angular/cdk/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';

/** A field's label as shown, followed only by the unit that screen readers hear (", in mm"). */
function labelled(label: string): RegExp {
  return new RegExp(`^${label.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}(,|$)`);
}

/** Test harness for one result on a card: its label, figure and unit as the person sees them. */
export class ReadingHarness extends ComponentHarness {
  static hostSelector = 'sw-reading';

  static with(options: BaseHarnessFilters & { label?: string | RegExp } = {}): HarnessPredicate<ReadingHarness> {
    return new HarnessPredicate(ReadingHarness, options).addOption('label', options.label, async (h, label) =>
      HarnessPredicate.stringMatches(h.getLabel(), label),
    );
  }

  private readonly labelEl = this.locatorFor('.label');
  private readonly valueEl = this.locatorFor('.value');
  private readonly unitEl = this.locatorForOptional('.unit');
  private readonly noteEl = this.locatorForOptional('.note');

  async getLabel(): Promise<string> {
    return (await this.labelEl()).text();
  }
  async getValue(): Promise<string> {
    return (await this.valueEl()).text();
  }
  async getUnit(): Promise<string> {
    return (await (await this.unitEl())?.text()) ?? '';
  }
  async getNote(): Promise<string> {
    return (await (await this.noteEl())?.text()) ?? '';
  }
  /** Figure and unit as one line, e.g. "56.5 m/min". */
  async getText(): Promise<string> {
    const unit = await this.getUnit();
    return unit ? `${await this.getValue()} ${unit}` : this.getValue();
  }
}

/** Test harness for a Workshop maths calculator card, found by its heading. */
export class MathsCardHarness extends ComponentHarness {
  static hostSelector = 'sw-maths-card';

  static with(options: BaseHarnessFilters & { heading?: string | RegExp } = {}): HarnessPredicate<MathsCardHarness> {
    return new HarnessPredicate(MathsCardHarness, options).addOption('heading', options.heading, async (h, heading) =>
      HarnessPredicate.stringMatches(h.getHeading(), heading),
    );
  }

  private readonly headingEl = this.locatorFor('h2');
  private readonly resultsEl = this.locatorForAll('.results');

  async getHeading(): Promise<string> {
    return (await this.headingEl()).text();
  }

  /** The form field with this label (the n-th when several share it, as the speed-step rows do). */
  async formField(label: string, index = 0): Promise<MatFormFieldHarness> {
    const all = await this.locatorForAll(MatFormFieldHarness.with({ floatingLabelText: labelled(label) }))();
    const field = all[index];
    if (!field) throw new Error(`No field labelled "${label}" (#${index}) on the card "${await this.getHeading()}"`);
    return field;
  }

  async input(label: string, index = 0): Promise<MatInputHarness> {
    const control = await (await this.formField(label, index)).getControl(MatInputHarness);
    if (!control) throw new Error(`The field "${label}" is not a text field`);
    return control;
  }

  /** Types each figure into its field, in order. */
  async fill(figures: Readonly<Record<string, string>>): Promise<void> {
    for (const [label, value] of Object.entries(figures)) {
      await (await this.input(label)).setValue(value);
    }
  }

  async value(label: string, index = 0): Promise<string> {
    return (await this.input(label, index)).getValue();
  }

  /** The unit printed beside a field. */
  async unitOf(label: string): Promise<string> {
    return (await (await this.formField(label)).getSuffixText()).trim();
  }

  async errorsOf(label: string): Promise<string[]> {
    return (await this.formField(label)).getTextErrors();
  }

  async choose(toggle: string | RegExp): Promise<void> {
    await (await this.locatorFor(MatButtonToggleHarness.with({ text: toggle }))()).check();
  }

  async isChosen(toggle: string | RegExp): Promise<boolean> {
    return (await this.locatorFor(MatButtonToggleHarness.with({ text: toggle }))()).isChecked();
  }

  async pick(label: string, option: string | RegExp): Promise<void> {
    const select = await (await this.formField(label)).getControl(MatSelectHarness);
    if (!select) throw new Error(`The field "${label}" is not a list`);
    await select.open();
    await select.clickOptions({ text: option });
  }

  async click(button: string | RegExp): Promise<void> {
    await (await this.locatorFor(MatButtonHarness.with({ text: button }))()).click();
  }

  async reading(label: string | RegExp): Promise<ReadingHarness> {
    return this.locatorFor(ReadingHarness.with({ label }))();
  }

  async hasReading(label: string | RegExp): Promise<boolean> {
    return (await this.locatorForOptional(ReadingHarness.with({ label }))()) !== null;
  }

  /** Everything in the results area, as text. */
  async resultsText(): Promise<string> {
    const parts = await Promise.all((await this.resultsEl()).map((el) => el.text()));
    return parts.join(' ');
  }

  async text(): Promise<string> {
    return (await this.host()).text();
  }
}
