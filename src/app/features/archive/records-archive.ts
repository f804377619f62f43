import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, DestroyRef, inject, linkedSignal, signal } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { provideNativeDateAdapter } from '@angular/material/core';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { ARCHIVE_PAGE_SIZES, type ArchiveItem, type ArchivePage, type ArchiveSort } from '@setwright/contracts/archive';
import { RECORD_STATUS_LABELS, RECORD_STATUSES, type RecordResult, type RecordStatus } from '@setwright/contracts/records';
import { debounce, map, of, timer } from 'rxjs';
import { ArchiveApi, blobProblem, fileNameOf, type ArchiveFilterParams } from './archive-api';
import { Downloads } from './downloads';
import { EvidencePack } from './evidence-pack';

/** A local calendar day as the instant it starts, with its offset (so "to" a day means to the end of it, in this tablet's zone). */
function startOfDay(d: Date, addDays = 0): string {
  return new Date(d.getFullYear(), d.getMonth(), d.getDate() + addDays).toISOString();
}

export const RESULT_LABELS: Record<RecordResult, string> = { passed: 'Passed', failed: 'Failed' };

/**
 * Records: the set-up records archive. The server pages, sorts and filters; each row opens the record,
 * downloads its signed PDF or runs its Record check; the current filter exports as an evidence pack.
 */
@Component({
  selector: 'sw-records-archive',
  imports: [
    DatePipe,
    EvidencePack,
    MatButtonModule,
    MatDatepickerModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    ReactiveFormsModule,
    RouterLink,
  ],
  providers: [provideNativeDateAdapter()],
  templateUrl: './records-archive.html',
  styleUrl: './records-archive.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RecordsArchive {
  private readonly api = inject(ArchiveApi);
  private readonly downloads = inject(Downloads);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly statuses = RECORD_STATUSES.map((value) => ({ value, label: RECORD_STATUS_LABELS[value] }));
  protected readonly statusLabel = (s: RecordStatus) => RECORD_STATUS_LABELS[s];
  protected readonly resultLabel = (r: RecordResult | null) => (r ? RESULT_LABELS[r] : '—');
  protected readonly pageSizes = ARCHIVE_PAGE_SIZES;
  protected readonly columns = ['signedAt', 'createdAt', 'machine', 'procedure', 'performedBy', 'approvedBy', 'result', 'actions'];

  protected readonly filters = new FormGroup({
    machineId: new FormControl('', { nonNullable: true }),
    procedure: new FormControl('', { nonNullable: true }),
    status: new FormControl<RecordStatus | ''>('', { nonNullable: true }),
    result: new FormControl<RecordResult | ''>('', { nonNullable: true }),
    person: new FormControl('', { nonNullable: true }),
    dateField: new FormControl<'signedAt' | 'createdAt'>('signedAt', { nonNullable: true }),
    from: new FormControl<Date | null>(null),
    to: new FormControl<Date | null>(null),
  });

  protected readonly machines = rxResource({ stream: () => this.api.machines() });
  protected readonly procedures = rxResource({
    stream: () =>
      this.api.procedures().pipe(
        // One entry per procedure, named by its newest version.
        map((versions) => [...new Map(versions.map((v) => [v.key, v])).values()].sort((a, b) => a.title.localeCompare(b.title))),
      ),
  });

  /** The filter as last applied (typing a name waits for a pause). */
  protected readonly applied = signal<ArchiveFilterParams>({ dateField: 'signedAt' });
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  protected readonly sortActive = signal<ArchiveSort>('signedAt');
  protected readonly sortDir = signal<'asc' | 'desc'>('desc');

  protected readonly page = rxResource({
    params: () => ({ ...this.applied(), page: this.pageIndex(), size: this.pageSize(), sort: this.sortActive(), dir: this.sortDir() }),
    stream: ({ params }) => this.api.records(params),
  });
  /** What the table shows: the latest page, kept while the next one loads. */
  protected readonly shown = linkedSignal<ArchivePage | undefined, ArchivePage>({
    source: () => (this.page.hasValue() ? this.page.value() : undefined),
    computation: (next, previous) => next ?? previous?.value ?? { items: [], total: 0 },
  });

  /** An evidence pack holds signed-off records only. */
  protected readonly packBlocked = computed(() => {
    const status = this.applied().status;
    return status && status !== 'signed_off' ? `Evidence packs hold signed-off records only; the state filter is “${RECORD_STATUS_LABELS[status]}”.` : null;
  });
  protected readonly packFilter = computed<ArchiveFilterParams>(() => ({ ...this.applied(), status: undefined }));
  protected readonly downloading = signal<string | null>(null);

  constructor() {
    let last = this.filters.getRawValue();
    const typed = (v: typeof last) => v.person.trim() !== last.person.trim() || v.from?.getTime() !== last.from?.getTime() || v.to?.getTime() !== last.to?.getTime();
    this.filters.valueChanges
      .pipe(
        map(() => this.filters.getRawValue()),
        // What is typed (a name, dates) is applied after a short pause; a choice from a list at once.
        debounce((v) => (typed(v) ? timer(350) : of(0))),
        takeUntilDestroyed(inject(DestroyRef)),
      )
      .subscribe((v) => {
        last = v;
        if (this.filters.invalid) return;
        const person = v.person.trim();
        const next: ArchiveFilterParams = {
          machineId: v.machineId || undefined,
          procedure: v.procedure || undefined,
          status: v.status || undefined,
          result: v.result || undefined,
          person: person.length >= 2 ? person : undefined,
          dateField: v.dateField,
          from: v.from ? startOfDay(v.from) : undefined,
          to: v.to ? startOfDay(v.to, 1) : undefined,
        };
        if (JSON.stringify(next) === JSON.stringify(this.applied())) return; // nothing that changes the query
        this.applied.set(next);
        this.pageIndex.set(0);
      });
  }

  protected paged(e: PageEvent) {
    this.pageIndex.set(e.pageIndex);
    this.pageSize.set(e.pageSize);
  }

  protected sorted(s: Sort) {
    this.sortActive.set((s.active || 'signedAt') as ArchiveSort);
    this.sortDir.set(s.direction === 'asc' ? 'asc' : 'desc');
    this.pageIndex.set(0);
  }

  protected clearFilters() {
    this.filters.reset({ machineId: '', procedure: '', status: '', result: '', person: '', dateField: 'signedAt', from: null, to: null });
  }

  protected async downloadPdf(item: ArchiveItem) {
    this.downloading.set(item.id);
    try {
      const res = await this.api.pdf(item.id);
      this.downloads.save(res.body!, fileNameOf(res, `record-${item.id}.pdf`));
    } catch (err) {
      const problem = await blobProblem(err);
      this.snackBar.open(`The PDF could not be downloaded. ${problem.detail ?? problem.title}`, 'Dismiss', { duration: 8000, politeness: 'assertive' });
    } finally {
      this.downloading.set(null);
    }
  }
}
