import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { DRIFT_RULE_TEXT } from '@setwright/contracts/trends';
import { Session } from '../../core/session';
import { MachineApi } from './machine-api';
import { TrendChart } from './trend-chart';

/** The machine page's readings over time: one chart per recorded reading, drifting ones first. */
@Component({
  selector: 'sw-reading-trends',
  imports: [MatProgressBarModule, TrendChart],
  template: `
    <section aria-labelledby="trends-title" class="trends">
      <h2 id="trends-title">Readings over time</h2>
      <p class="rule">{{ rule }}</p>
      @if (trends.isLoading() && !trends.value()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the readings" />
      } @else if (trends.error()) {
        <p role="alert">The readings could not be loaded.</p>
      } @else {
        @if (drifting().length) {
          <p class="drifting" role="status">
            {{ drifting().length }} reading{{ drifting().length === 1 ? ' is' : 's are' }} drifting toward a limit:
            {{ drifting().join('; ') }}.
          </p>
        }
        <div class="charts">
          @for (s of series(); track s.key) {
            <sw-trend-chart [series]="s" [linkRecords]="readsRecords()" />
          } @empty {
            <p>No readings are recorded for this saw yet.</p>
          }
        </div>
      }
    </section>
  `,
  styles: `
    :host { display: block; margin: 0 0 24px; }
    h2 { font: var(--mat-sys-title-large); }
    .rule { color: var(--mat-sys-on-surface-variant); margin: -8px 0 12px; max-width: 72ch; }
    .drifting { font-weight: 700; }
    .charts { display: grid; grid-template-columns: repeat(auto-fill, minmax(min(100%, 440px), 1fr)); gap: 16px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReadingTrends {
  private readonly api = inject(MachineApi);
  private readonly session = inject(Session);
  readonly machineId = input.required<string>();

  protected readonly rule = DRIFT_RULE_TEXT;
  protected readonly trends = rxResource({ params: () => this.machineId(), stream: ({ params }) => this.api.trends(params) });
  /** Drifting readings first, then the rest in the server's order. */
  protected readonly series = computed(() => {
    const all = this.trends.value()?.series ?? [];
    return [...all.filter((s) => s.drift), ...all.filter((s) => !s.drift)];
  });
  protected readonly drifting = computed(() => this.series().filter((s) => s.drift).map((s) => `${s.label} (${s.procedureTitle})`));
  protected readonly readsRecords = computed(() => this.session.hasAnyRole(['competent_person', 'auditor', 'workshop_admin']));
}
