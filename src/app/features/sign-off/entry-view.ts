import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { DatePipe } from '@angular/common';
import type { StepEntryView } from '@setwright/contracts/records';
import type { Step } from '@setwright/procedures/schema';
import { PhotoThumb } from '../../shared/ui/photo-capture/photo-thumb';

/** One saved attempt of a step, as a reviewer or auditor reads it: every value with its unit and verdict. */
@Component({
  selector: 'sw-entry-view',
  imports: [DatePipe, PhotoThumb],
  template: `
    <div class="attempt" [class.superseded]="superseded()">
      <p class="head">
        Attempt {{ entry().attempt }} · {{ entry().enteredBy.displayName }} · {{ entry().createdAt | date: 'd MMM y, HH:mm' }}
        @if (superseded()) { <span class="chip">re-measured later</span> }
        <span class="chip" [class.fail]="entry().outcome === 'out_of_limits'">{{ entry().outcome === 'done' ? 'Done' : 'Out of limits' }}</span>
      </p>
      <dl>
        @for (row of rows(); track row.id) {
          <dt>{{ row.label }}</dt>
          <dd [attr.data-outcome]="row.outcome">
            @if (row.photos) {
              @for (p of row.photos; track p) { <sw-photo-thumb [photoId]="p" [alt]="row.label" /> }
              @if (!row.photos.length) { — }
            } @else {
              {{ row.text }}
              @if (row.outcome === 'fail') { <strong class="bad"> · out of limits</strong> }
              @if (row.outcome === 'warn') { <strong class="warn"> · outside the usual range</strong> }
              @if (row.limits) { <span class="limits">({{ row.limits }})</span> }
            }
          </dd>
        }
      </dl>
      @if (entry().correctiveNote) {
        <p class="note"><strong>Corrective note:</strong> {{ entry().correctiveNote }}</p>
      }
      @if (entry().witnessedBy; as w) {
        <p class="witness">Witnessed by {{ w.displayName }} at {{ entry().witnessedAt | date: 'd MMM y, HH:mm:ss' }}</p>
      }
    </div>
  `,
  styles: `
    .attempt {
      padding: 10px 12px;
      border-left: 4px solid var(--mat-sys-primary);
      background: var(--mat-sys-surface-container-lowest);
      border-radius: 4px;
      margin-bottom: 10px;
    }
    .superseded {
      border-left-color: var(--mat-sys-outline);
      opacity: 0.85;
    }
    .head {
      margin: 0 0 8px;
      color: var(--mat-sys-on-surface-variant);
      display: flex;
      gap: 8px;
      flex-wrap: wrap;
      align-items: center;
    }
    .chip {
      padding: 1px 8px;
      border-radius: 4px;
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
      font-weight: 500;
    }
    .chip.fail {
      background: var(--sw-safety-prohibition);
      color: #fff;
    }
    dl {
      display: grid;
      grid-template-columns: minmax(160px, max-content) 1fr;
      gap: 6px 16px;
      margin: 0;
    }
    dt {
      color: var(--mat-sys-on-surface-variant);
    }
    dd {
      margin: 0;
      font-weight: 500;
      display: flex;
      gap: 8px;
      flex-wrap: wrap;
      align-items: baseline;
    }
    .bad {
      color: var(--sw-safety-prohibition);
    }
    .limits {
      color: var(--mat-sys-on-surface-variant);
      font-weight: 400;
    }
    .note,
    .witness {
      margin: 8px 0 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EntryView {
  readonly step = input.required<Step>();
  readonly entry = input.required<StepEntryView>();
  readonly superseded = input(false);

  protected readonly rows = computed(() => {
    const e = this.entry();
    const out: { id: string; label: string; text?: string; photos?: string[]; outcome?: string; limits?: string }[] = [];
    for (const input of this.step().inputs) {
      const v = e.values[input.id];
      const result = e.evaluation.inputs.find((i) => i.id === input.id);
      const limits = result?.limits;
      const limitText = limits ? [limits.min !== undefined ? `min ${limits.min}` : '', limits.max !== undefined ? `max ${limits.max}` : ''].filter(Boolean).join(', ') + (limits.unit ? ` ${limits.unit}` : '') : undefined;
      if (input.type === 'photo') {
        out.push({ id: input.id, label: input.label, photos: Array.isArray(v) ? (v as string[]) : [] });
        continue;
      }
      let text = '—';
      if (v !== null && v !== undefined && v !== '') {
        if (input.type === 'number') text = `${v} ${input.unit}`;
        else if (input.type === 'yesno') text = v === true ? 'Yes' : 'No';
        else if (input.type === 'choice') text = input.options.find((o) => o.value === v)?.label ?? String(v);
        else text = String(v);
      }
      out.push({ id: input.id, label: input.label, text, outcome: result?.outcome, limits: limitText });
    }
    for (const c of e.evaluation.computed) {
      out.push({ id: `computed-${c.id}`, label: c.label, text: c.display, outcome: c.outcome });
    }
    return out;
  });
}
