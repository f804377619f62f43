import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { DIFF_FIELD_LABELS, type ItemDiff, type ProcedureDiff, type StepDiff } from '@setwright/procedures/diff';

const CHANGE_LABELS: Record<StepDiff['change'], string> = {
  added: 'Added',
  removed: 'Removed',
  changed: 'Changed',
  moved: 'Moved',
  unchanged: 'Unchanged',
};

const words = (fields: readonly string[]) => fields.map((f) => DIFF_FIELD_LABELS[f] ?? f).join(', ');

/** A difference between two versions, step by step, in plain words. */
@Component({
  selector: 'sw-diff-view',
  templateUrl: './diff-view.html',
  styleUrl: './diff-view.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DiffView {
  readonly diff = input.required<ProcedureDiff>();

  protected readonly summary = computed(() => {
    const d = this.diff();
    if (d.same) return `No differences from version ${d.from.version} apart from the version number.`;
    const parts: string[] = [];
    const n = d.summary;
    const count = (k: number, what: string) => (k ? `${k} step${k === 1 ? '' : 's'} ${what}` : '');
    parts.push(count(n.changed, 'changed'), count(n.added, 'added'), count(n.removed, 'removed'), count(n.moved, 'moved'));
    const said = parts.filter(Boolean).join(', ');
    return `Compared with version ${d.from.version}: ${said || 'the steps are the same'}.`;
  });
  protected readonly topFields = computed(() => words(this.diff().fields));

  protected changeLabel(s: StepDiff) {
    return CHANGE_LABELS[s.change];
  }
  protected fieldWords(s: StepDiff) {
    return words(s.fields.filter((f) => f !== 'inputs' && f !== 'computed'));
  }
  protected itemLine(kind: 'Field' | 'Worked-out value', item: ItemDiff): string {
    const name = `${kind} “${item.label}”`;
    switch (item.change) {
      case 'added':
        return `${name} added`;
      case 'removed':
        return `${name} removed`;
      case 'moved':
        return `${name} moved`;
      default:
        return `${name}: ${words(item.fields)} changed${item.moved ? ', and moved' : ''}`;
    }
  }
}
