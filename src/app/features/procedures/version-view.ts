import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { mathsFunctions } from '@setwright/maths';
import type { ComputedField, Procedure, StepInput } from '@setwright/procedures/schema';
import { CautionList } from '../../shared/ui/caution/caution-list';
import { INPUT_TYPE_LABELS, limitsText, machineKindLabel, passText, STEP_KIND_LABELS } from './procedure-words';

/** A procedure version read through: what it is for, its hazards and PPE, then each step as the trainee will meet it. */
@Component({
  selector: 'sw-version-view',
  imports: [CautionList],
  templateUrl: './version-view.html',
  styleUrl: './version-view.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionView {
  readonly body = input.required<Procedure>();

  protected readonly kindLabel = (k: keyof typeof STEP_KIND_LABELS) => STEP_KIND_LABELS[k];
  protected readonly typeLabel = (i: StepInput) => INPUT_TYPE_LABELS[i.type];
  protected readonly machineKind = machineKindLabel;
  protected readonly passText = passText;

  protected paragraphs(text: string) {
    return text.split(/\n\s*\n/);
  }

  protected inputDetail(i: StepInput): string {
    switch (i.type) {
      case 'number':
        return `in ${i.unit}, ${i.decimals} decimal place${i.decimals === 1 ? '' : 's'}`;
      case 'choice':
        return i.options.map((o) => o.label).join(' · ');
      case 'text':
        return `up to ${i.maxLength} characters`;
      case 'photo':
        return `${i.min} to ${i.max} photos`;
      default:
        return '';
    }
  }

  protected neededText(i: StepInput): string {
    if (i.requiredWhen) return `Needed when “${i.requiredWhen.input}” is ${i.requiredWhen.in.map((a) => (a === true ? 'yes' : a === false ? 'no' : a)).join(' or ')}`;
    return i.required ? 'Must be filled in' : 'Optional';
  }

  protected computedDetail(c: ComputedField): string {
    const fn = (mathsFunctions as Record<string, { summary: string }>)[c.fn];
    const parts = [fn ? fn.summary : `Maths function “${c.fn}”`];
    if (c.unit) parts.push(`shown in ${c.unit}`);
    if (c.limits) parts.push(`passes within ${limitsText(c.limits, c.unit)}`);
    if (c.acceptable?.length) parts.push(`passes when ${c.acceptable.join(' or ')}`);
    if (c.advisory?.length) parts.push(`warns when ${c.advisory.join(' or ')}`);
    return parts.join('; ');
  }
}
