import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** The standing reminder that Setwright supports, and never replaces, local rules and supervision. */
@Component({
  selector: 'sw-safety-note',
  imports: [MatIconModule],
  template: `
    <aside class="note" aria-label="Safety">
      <mat-icon aria-hidden="true">health_and_safety</mat-icon>
      <p>
        Setwright supports your workshop’s safe systems of work. It never replaces local codes and regulations, the
        machine maker’s instructions, or supervision by a competent person. Isolate the saw before any work inside its
        guards, and stop if anything is not as the procedure describes.
      </p>
    </aside>
  `,
  styles: `
    .note {
      display: flex;
      gap: 12px;
      align-items: flex-start;
      padding: 14px 16px;
      border-left: 6px solid var(--sw-safety-mandatory);
      background: var(--mat-sys-surface-container-lowest);
      border-radius: 4px;
      font: var(--mat-sys-body-medium);
    }
    mat-icon {
      color: var(--sw-safety-mandatory);
      flex: none;
    }
    p {
      margin: 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SafetyNote {}
