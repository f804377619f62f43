import { ComponentHarness } from '@angular/cdk/testing';
import { MatInputHarness } from '@angular/material/input/testing';

/** Test harness for a reading field: what the trainee types, the limits shown, and the verdict. */
export class ReadingFieldHarness extends ComponentHarness {
  static hostSelector = 'sw-reading-field';

  private readonly input = this.locatorFor(MatInputHarness);
  private readonly badge = this.locatorForOptional('.badge .verdict');
  private readonly hint = this.locatorForOptional('mat-hint');
  private readonly label = this.locatorFor('mat-label');
  private readonly errorEl = this.locatorForOptional('mat-error');

  async getLabel(): Promise<string> {
    return (await this.label()).text();
  }
  async setValue(value: string): Promise<void> {
    const input = await this.input();
    await input.setValue(value);
    await input.blur();
  }
  async getValue(): Promise<string> {
    return (await this.input()).getValue();
  }
  /** 'Within limits', 'Out of limits' or '' while nothing is entered or there are no limits. */
  async getVerdict(): Promise<string> {
    const badge = await this.badge();
    return badge ? (await badge.text()).trim() : '';
  }
  /** The reason shown under the field when what was typed is refused, or ''. */
  async getError(): Promise<string> {
    const error = await this.errorEl();
    return error ? (await error.text()).trim() : '';
  }
  async getLimits(): Promise<string> {
    const hint = await this.hint();
    return hint ? hint.text() : '';
  }
}
