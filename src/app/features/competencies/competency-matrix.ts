import { DOCUMENT } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import type { CompetencyCell, MatrixProcedure, MatrixRow } from '@setwright/contracts/competencies';
import { ROLE_LABELS } from '@setwright/contracts/roles';
import { firstValueFrom } from 'rxjs';
import { toProblem } from '../../core/problem';
import { Session } from '../../core/session';
import { AuthorisationDialog, type AuthorisationDialogData } from './authorisation-dialog';
import { CompetencyApi } from './competency-api';

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
/** "12 Mar 2027" from "2027-03-12", without time-zone shifts. */
const dayText = (iso: string) => `${Number(iso.slice(8, 10))} ${MONTHS[Number(iso.slice(5, 7)) - 1]} ${iso.slice(0, 4)}`;

/** People × procedures: witnessed and signed runs, and each authorisation with its expiry. */
@Component({
  selector: 'sw-competency-matrix',
  imports: [MatTableModule, MatButtonModule, MatIconModule, MatProgressBarModule, MatFormFieldModule, MatInputModule],
  templateUrl: './competency-matrix.html',
  styleUrl: './competency-matrix.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CompetencyMatrix {
  private readonly api = inject(CompetencyApi);
  private readonly dialog = inject(MatDialog);
  private readonly session = inject(Session);
  private readonly document = inject(DOCUMENT);

  protected readonly matrix = rxResource({ stream: () => this.api.matrix() });
  protected readonly filter = signal('');
  protected readonly downloading = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly procedures = computed(() => (this.matrix.hasValue() ? this.matrix.value().procedures : []));
  protected readonly columns = computed(() => ['person', ...this.procedures().map((p) => p.key)]);
  protected readonly rows = computed(() => {
    const rows = this.matrix.hasValue() ? this.matrix.value().rows : [];
    const f = this.filter().trim().toLowerCase();
    return f ? rows.filter((r) => r.person.displayName.toLowerCase().includes(f)) : rows;
  });
  protected readonly canGrant = computed(() => this.session.hasAnyRole(['competent_person']));
  protected readonly canRevoke = computed(() => this.session.hasAnyRole(['competent_person', 'workshop_admin']));
  protected readonly roleLabels = ROLE_LABELS;

  protected roles(row: MatrixRow): string {
    return row.person.roles.map((r) => this.roleLabels[r]).join(' · ');
  }

  protected cell(row: MatrixRow, key: string): CompetencyCell | null {
    return row.cells[key] ?? null;
  }

  /** The authorisation as the cell reads it. */
  protected authorisationText(c: CompetencyCell | null): string {
    const a = c?.authorisation;
    if (!a) return 'Not authorised';
    if (a.state === 'expired') return `Expired ${dayText(a.expiresOn)}`;
    if (a.state === 'expiring') return a.daysLeft === 0 ? 'Expires today' : `Expires in ${a.daysLeft} ${a.daysLeft === 1 ? 'day' : 'days'}`;
    return `Authorised to ${dayText(a.expiresOn)}`;
  }

  protected cellLabel(row: MatrixRow, p: MatrixProcedure): string {
    const c = this.cell(row, p.key);
    return `${row.person.displayName}, ${p.title}: ${c?.witnessedRuns ?? 0} witnessed, ${c?.signedRuns ?? 0} signed, ${this.authorisationText(c)}`;
  }

  protected async open(row: MatrixRow, procedure: MatrixProcedure) {
    const me = this.session.user()?.id;
    const data: AuthorisationDialogData = {
      person: { id: row.person.id, displayName: row.person.displayName },
      procedure,
      cell: this.cell(row, procedure.key),
      today: this.matrix.value()!.today,
      canGrant: this.canGrant() && row.person.id !== me,
      canRevoke: this.canRevoke(),
    };
    const changed = await firstValueFrom(this.dialog.open(AuthorisationDialog, { data, width: '640px', maxWidth: '95vw' }).afterClosed());
    if (changed) this.matrix.reload();
  }

  /** The same matrix as CSV, fetched with the sign-in and saved through a temporary link. */
  protected async download() {
    this.downloading.set(true);
    this.problem.set(null);
    try {
      const blob = await this.api.csv();
      const url = URL.createObjectURL(blob);
      const link = this.document.createElement('a');
      link.href = url;
      link.download = `competency-matrix-${this.matrix.value()?.today ?? 'export'}.csv`;
      this.document.body.appendChild(link);
      link.click();
      link.remove();
      setTimeout(() => URL.revokeObjectURL(url), 1000);
    } catch (err) {
      const p = toProblem(err);
      this.problem.set(p.detail ?? p.title);
    } finally {
      this.downloading.set(false);
    }
  }
}
