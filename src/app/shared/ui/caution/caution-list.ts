import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { Caution } from '@setwright/procedures/schema';

/** Our own pictogram (a Material Symbol) for each ISO 7010 sign code a caution may carry. */
const PICTOGRAMS: Record<string, string> = {
  M002: 'menu_book',
  M004: 'eyeglasses',
  M009: 'back_hand',
  M021: 'power_off',
  W001: 'warning',
  W012: 'bolt',
  W018: 'autorenew',
  W019: 'compress',
  W022: 'content_cut',
  P010: 'do_not_touch',
  P012: 'block',
};
const LEVEL_ICON = { mandatory: 'info', warning: 'warning', prohibition: 'block' } as const;
const LEVEL_WORD = { mandatory: 'Do this', warning: 'Warning', prohibition: 'Do not' } as const;

/** Cautions, shown above the work they guard, in ISO 3864 colours with their ISO 7010 code. Never hidden behind a tap. */
@Component({
  selector: 'sw-caution-list',
  imports: [MatIconModule],
  template: `
    @if (cautions().length) {
      <ul class="cautions" [attr.aria-label]="heading()">
        @for (c of cautions(); track $index) {
          <li class="caution" [class]="c.level">
            <span class="sign" aria-hidden="true"><mat-icon>{{ pictogram(c) }}</mat-icon></span>
            <span class="body">
              <strong>{{ word(c) }}@if (c.code) { <span class="code">· ISO 7010 {{ c.code }}</span> }</strong>
              <span>{{ c.text }}</span>
            </span>
          </li>
        }
      </ul>
    }
  `,
  styleUrl: './caution-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CautionList {
  readonly cautions = input.required<readonly Caution[]>();
  readonly heading = input('Cautions');

  protected pictogram(c: Caution): string {
    return (c.code && PICTOGRAMS[c.code]) || LEVEL_ICON[c.level];
  }
  protected word(c: Caution): string {
    return LEVEL_WORD[c.level];
  }
}
