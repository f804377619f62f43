import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { DatePipe } from '@angular/common';
import { RouterLink } from '@angular/router';
import { BLADE_MATERIAL_LABELS, type BladeTypeView } from '@setwright/contracts/blades';
import { firstValueFrom } from 'rxjs';
import { Session } from '../../core/session';
import { UnitChoice } from '../workshop-maths/unit-choice';
import { areaText } from './area';
import { BladeApi } from './blade-api';
import { BladeTypeDialog } from './blade-type-dialog';

/** Blades: the types and stock on the list, and the blade on each saw now with its break-in. */
@Component({
  selector: 'sw-blades',
  imports: [MatTableModule, MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink, DatePipe],
  templateUrl: './blades.html',
  styleUrl: './blades.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Blades {
  private readonly api = inject(BladeApi);
  private readonly dialog = inject(MatDialog);
  private readonly session = inject(Session);
  private readonly units = inject(UnitChoice);

  protected readonly types = rxResource({ stream: () => this.api.types() });
  protected readonly saws = rxResource({ stream: () => this.api.onSaws() });
  protected readonly isAdmin = computed(() => this.session.hasAnyRole(['workshop_admin']));
  protected readonly typeColumns = computed(() => ['size', 'pitch', 'material', 'stock', 'onSaws', ...(this.isAdmin() ? ['actions'] : [])]);
  protected readonly sawColumns = ['machine', 'blade', 'fitted', 'breakIn'];
  protected readonly materialLabels = BLADE_MATERIAL_LABELS;

  protected area(a: Parameters<typeof areaText>[0]): string {
    return areaText(a, this.units.system());
  }

  protected materialLabel(t: BladeTypeView): string {
    return this.materialLabels[t.material];
  }

  protected size(t: BladeTypeView): string {
    return `${t.widthMm} × ${t.thicknessMm} × ${t.lengthMm} mm`;
  }

  protected async edit(type: BladeTypeView | null) {
    const saved = await firstValueFrom(this.dialog.open(BladeTypeDialog, { data: type, width: '640px', maxWidth: '95vw' }).afterClosed());
    if (saved) this.types.reload();
  }
}
