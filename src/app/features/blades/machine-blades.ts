import { DatePipe, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { AreaView, FittingView } from '@setwright/contracts/blades';
import type { UnitSystem } from '@setwright/maths';
import { firstValueFrom, of } from 'rxjs';
import { Session } from '../../core/session';
import { UnitChoice } from '../workshop-maths/unit-choice';
import { areaText } from './area';
import { BladeApi } from './blade-api';
import { CutLogForm } from './cut-log-form';
import { RemovalDialog } from './removal-dialog';

/** One machine's blades: the blade on it now with its break-in and cut log, and every blade before it. */
@Component({
  selector: 'sw-machine-blades',
  imports: [MatTableModule, MatButtonModule, MatButtonToggleModule, MatIconModule, MatProgressBarModule, RouterLink, DatePipe, DecimalPipe, CutLogForm],
  templateUrl: './machine-blades.html',
  styleUrl: './machine-blades.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachineBlades {
  private readonly api = inject(BladeApi);
  private readonly dialog = inject(MatDialog);
  private readonly session = inject(Session);
  private readonly units = inject(UnitChoice);
  /** The machine's id, from the route. */
  readonly id = input.required<string>();

  protected readonly blades = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.machine(params) });
  protected readonly current = computed(() => (this.blades.hasValue() ? this.blades.value().current : null));
  protected readonly cuts = rxResource({ params: () => this.current()?.id, stream: ({ params }) => (params ? this.api.fitting(params) : of(null)) });
  protected readonly system = this.units.system;
  protected readonly canLog = computed(() => this.session.hasAnyRole(['trainee', 'competent_person', 'workshop_admin']));
  protected readonly canRemove = computed(() => this.session.hasAnyRole(['competent_person', 'workshop_admin']));
  protected readonly historyColumns = ['fitted', 'blade', 'cut', 'removed', 'reason'];

  protected area(a: AreaView): string {
    return areaText(a, this.system());
  }

  protected choose(system: UnitSystem) {
    this.units.choose(system);
  }

  protected reload() {
    this.blades.reload();
    this.cuts.reload();
  }

  protected async takeOff(fitting: FittingView) {
    const done = await firstValueFrom(this.dialog.open(RemovalDialog, { data: fitting, width: '560px', maxWidth: '95vw' }).afterClosed());
    if (done) this.blades.reload();
  }
}
