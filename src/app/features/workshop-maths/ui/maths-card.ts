import { ChangeDetectionStrategy, Component, computed, input, ViewEncapsulation } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/**
 * The frame of one calculator: heading, a line on what it is for, then the card's own fields and
 * results. Its stylesheet is not encapsulated so that it can lay out the fields, choices and
 * readings every card projects into it; each rule is scoped under `sw-maths-card`.
 */
@Component({
  selector: 'sw-maths-card',
  imports: [MatIconModule],
  template: `
    <section class="frame" [attr.aria-labelledby]="headingId()">
      <header>
        <mat-icon aria-hidden="true">{{ icon() }}</mat-icon>
        <h2 [id]="headingId()" tabindex="-1">{{ heading() }}</h2>
      </header>
      <p class="lede">{{ lede() }}</p>
      <ng-content />
    </section>
  `,
  styleUrl: './maths-card.scss',
  encapsulation: ViewEncapsulation.None,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MathsCard {
  /** Short name used for the heading's id (the page's "jump to" list finds cards by it). */
  readonly key = input.required<string>();
  readonly heading = input.required<string>();
  readonly icon = input.required<string>();
  readonly lede = input.required<string>();
  protected readonly headingId = computed(() => `maths-${this.key()}`);
}
