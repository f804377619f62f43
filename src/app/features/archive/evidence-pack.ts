import { HttpEventType, type HttpEvent } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, DestroyRef, inject, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RECORD_COUNT_HEADER } from '@setwright/contracts/archive';
import type { Subscription } from 'rxjs';
import { ArchiveApi, blobProblem, fileNameOf, type ArchiveFilterParams } from './archive-api';
import { Downloads } from './downloads';

type PackState =
  | { kind: 'idle' }
  | { kind: 'loading'; records: number | null; bytes: number }
  | { kind: 'done'; records: number; bytes: number; fileName: string }
  | { kind: 'failed'; message: string; bytes: number };

/** "1.4 MB", "820 KB", "512 bytes". */
export function sizeText(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/** Download the evidence pack for the current filter, with its progress and a clear way to try again. */
@Component({
  selector: 'sw-evidence-pack',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule],
  template: `
    <div class="pack" role="group" aria-labelledby="pack-title">
      <div class="text">
        <h2 id="pack-title">Evidence pack</h2>
        <p class="hint">Every signed-off record the filter selects: each PDF, an index and a manifest of SHA-256 hashes, in one zip.</p>
      </div>
      <div class="actions">
        @switch (state().kind) {
          @case ('loading') {
            <button mat-stroked-button type="button" (click)="stop()">
              <mat-icon>stop_circle</mat-icon>
              Stop
            </button>
          }
          @case ('failed') {
            <button mat-flat-button type="button" (click)="download()">
              <mat-icon>refresh</mat-icon>
              Try again
            </button>
          }
          @default {
            <button mat-flat-button type="button" (click)="download()" [disabled]="!!blockedBecause()">
              <mat-icon>folder_zip</mat-icon>
              Download evidence pack
            </button>
          }
        }
      </div>
      @if (blockedBecause(); as why) {
        <p class="note">{{ why }}</p>
      }
      <div class="progress" aria-live="polite">
        @switch (state().kind) {
          @case ('loading') {
            <!-- The pack is built while it is sent, so its size is not known until the end. -->
            <mat-progress-bar mode="indeterminate" aria-label="Evidence pack download" />
            <p class="status">{{ statusText() }}</p>
          }
          @case ('done') {
            <mat-progress-bar mode="determinate" [value]="100" aria-label="Evidence pack download" />
            <p class="status">{{ statusText() }}</p>
          }
          @case ('failed') {
            <p class="status failed" role="alert">
              <mat-icon aria-hidden="true">error</mat-icon>
              {{ statusText() }}
            </p>
          }
        }
      </div>
    </div>
  `,
  styles: `
    .pack {
      display: grid;
      grid-template-columns: 1fr auto;
      gap: 4px 16px;
      align-items: center;
      padding: 16px;
      border-radius: 8px;
      background: var(--mat-sys-surface-container-lowest);
      border: 1px solid var(--mat-sys-outline-variant);
    }
    h2 {
      font: var(--mat-sys-title-medium);
      margin: 0;
    }
    .hint,
    .note {
      margin: 2px 0 0;
      color: var(--mat-sys-on-surface-variant);
    }
    .note,
    .progress {
      grid-column: 1 / -1;
    }
    .status {
      margin: 6px 0 0;
      display: flex;
      align-items: center;
      gap: 6px;
    }
    .status.failed {
      color: var(--mat-sys-error);
      font-weight: 500;
    }
    @media (max-width: 600px) {
      .pack {
        grid-template-columns: 1fr;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EvidencePack {
  private readonly api = inject(ArchiveApi);
  private readonly downloads = inject(Downloads);
  /** The Records list's current filter. */
  readonly filter = input.required<ArchiveFilterParams>();
  /** Set when the filter cannot make a pack (it selects records that are not signed off). */
  readonly blockedBecause = input<string | null>(null);

  protected readonly state = signal<PackState>({ kind: 'idle' });
  private running?: Subscription;

  protected readonly statusText = computed(() => {
    const s = this.state();
    switch (s.kind) {
      case 'loading':
        return s.records === null
          ? `Asking for the pack… ${sizeText(s.bytes)} received`
          : `Packing ${plural(s.records, 'record')} · ${sizeText(s.bytes)} received`;
      case 'done':
        return `Saved ${s.fileName}: ${plural(s.records, 'record')}, ${sizeText(s.bytes)}.`;
      case 'failed':
        return `${s.message} ${s.bytes ? `It stopped after ${sizeText(s.bytes)}. ` : ''}Nothing was saved; try again.`;
      default:
        return '';
    }
  });

  constructor() {
    inject(DestroyRef).onDestroy(() => this.running?.unsubscribe());
  }

  protected download() {
    this.running?.unsubscribe();
    this.state.set({ kind: 'loading', records: null, bytes: 0 });
    let records: number | null = null;
    this.running = this.api.evidencePack(this.filter()).subscribe({
      next: (event: HttpEvent<Blob>) => {
        if (event.type === HttpEventType.ResponseHeader) {
          const count = Number(event.headers.get(RECORD_COUNT_HEADER));
          records = Number.isFinite(count) ? count : null;
          this.state.set({ kind: 'loading', records, bytes: 0 });
        } else if (event.type === HttpEventType.DownloadProgress) {
          this.state.set({ kind: 'loading', records, bytes: event.loaded });
        } else if (event.type === HttpEventType.Response) {
          const blob = event.body!;
          const fileName = fileNameOf(event, 'evidence-pack.zip');
          this.downloads.save(blob, fileName);
          this.state.set({ kind: 'done', records: records ?? Number(event.headers.get(RECORD_COUNT_HEADER) ?? 0), bytes: blob.size, fileName });
        }
      },
      error: async (err: unknown) => {
        const bytes = this.state().kind === 'loading' ? (this.state() as { bytes: number }).bytes : 0;
        const problem = await blobProblem(err);
        const message = problem.status === 0 ? 'The download was cut off.' : `${problem.title}${problem.detail ? `: ${problem.detail}` : '.'}`;
        this.state.set({ kind: 'failed', message, bytes });
      },
    });
  }

  protected stop() {
    this.running?.unsubscribe();
    this.state.set({ kind: 'idle' });
  }
}
