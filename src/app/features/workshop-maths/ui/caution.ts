import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/**
 * A caution above the work it guards, with its ISO 7010 sign code. Mandatory actions carry the
 * safety blue; warnings carry safety yellow with black.
 */
@Component({
  selector: 'sw-maths-caution',
  imports: [MatIconModule],
  template: `
    <mat-icon aria-hidden="true">{{ icon() }}</mat-icon>
    <p>
      <span class="sw-visually-hidden">{{ kind() === 'warning' ? 'Warning' : 'Safety' }} ({{ code() }}):</span>
      <ng-content />
    </p>
  `,
  styles: `
    :host {
      display: flex;
      gap: 10px;
      align-items: flex-start;
      margin: 0 0 16px;
      padding: 10px 12px;
      border-radius: 4px;
      border-left: 6px solid var(--sw-safety-mandatory);
      background: var(--mat-sys-surface-container);
      font: var(--mat-sys-body-medium);
    }
    mat-icon {
      flex: none;
      color: var(--sw-safety-mandatory);
    }
    p {
      margin: 0;
    }
    :host(.warning) {
      border-left-color: #000;
      background: var(--sw-safety-warning);
      color: #000;
    }
    :host(.warning) mat-icon {
      color: #000;
    }
  `,
  host: { role: 'note', '[class.warning]': "kind() === 'warning'" },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MathsCaution {
  /** ISO 7010 sign code, e.g. M002 (refer to instructions), M021 (disconnect first), W019 (crushing). */
  readonly code = input.required<string>();
  readonly icon = input.required<string>();
  readonly kind = input<'mandatory' | 'warning'>('mandatory');
}
