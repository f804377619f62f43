import { ChangeDetectionStrategy, Component, DestroyRef, inject, input, signal, effect } from '@angular/core';
import { PhotoApi } from './photo-api';

/** A stored photo's thumbnail, fetched with the access token (an <img src> could not send it). */
@Component({
  selector: 'sw-photo-thumb',
  template: `
    @if (url(); as u) {
      <img [src]="u" [alt]="alt()" width="160" />
    } @else if (failed()) {
      <span class="missing">Photo could not be loaded</span>
    } @else {
      <span class="loading" aria-label="Loading photo"></span>
    }
  `,
  styles: `
    :host {
      display: inline-block;
    }
    img {
      display: block;
      max-width: 160px;
      height: auto;
      border-radius: 6px;
      border: 1px solid var(--mat-sys-outline-variant);
    }
    .loading {
      display: block;
      width: 160px;
      height: 120px;
      border-radius: 6px;
      background: var(--mat-sys-surface-container);
    }
    .missing {
      color: var(--mat-sys-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PhotoThumb {
  private readonly api = inject(PhotoApi);
  readonly photoId = input.required<string>();
  readonly alt = input('Photo taken at the saw');
  protected readonly url = signal<string | null>(null);
  protected readonly failed = signal(false);

  constructor() {
    const destroyRef = inject(DestroyRef);
    effect((onCleanup) => {
      const sub = this.api.thumbnail(this.photoId()).subscribe({
        next: (blob) => {
          const url = URL.createObjectURL(blob);
          this.url.set(url);
          onCleanup(() => URL.revokeObjectURL(url));
        },
        error: () => this.failed.set(true),
      });
      onCleanup(() => sub.unsubscribe());
    });
    destroyRef.onDestroy(() => this.url.set(null));
  }
}
