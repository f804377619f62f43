import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import { toProblem } from '../../core/problem';
import { ArchiveApi, blobProblem, fileNameOf } from './archive-api';
import { Downloads } from './downloads';

type Verdict = 'intact' | 'broken' | 'unsigned';

/**
 * Record check: recompute a record's hash from what is stored and follow its link to the machine's
 * previous signed record, then say plainly whether it is intact. The PDF's QR code points here.
 */
@Component({
  selector: 'sw-record-check',
  imports: [DatePipe, MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink],
  templateUrl: './record-check.html',
  styleUrl: './record-check.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RecordCheckPage {
  private readonly api = inject(ArchiveApi);
  private readonly downloads = inject(Downloads);
  private readonly snackBar = inject(MatSnackBar);
  /** The record id, from the route. */
  readonly id = input.required<string>();

  protected readonly check = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.check(params) });
  protected readonly result = computed(() => (this.check.hasValue() ? this.check.value() : undefined));
  protected readonly problem = computed(() => (this.check.error() ? toProblem(this.check.error()) : null));
  protected readonly verdict = computed<Verdict | null>(() => {
    const r = this.result();
    if (!r) return null;
    if (!r.storedHash) return 'unsigned';
    return r.intact ? 'intact' : 'broken';
  });
  protected readonly downloading = signal(false);

  protected async downloadPdf() {
    this.downloading.set(true);
    try {
      const res = await this.api.pdf(this.id());
      this.downloads.save(res.body!, fileNameOf(res, `record-${this.id()}.pdf`));
    } catch (err) {
      const problem = await blobProblem(err);
      this.snackBar.open(`The PDF could not be downloaded. ${problem.detail ?? problem.title}`, 'Dismiss', { duration: 8000, politeness: 'assertive' });
    } finally {
      this.downloading.set(false);
    }
  }
}
