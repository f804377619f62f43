import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, effect, inject, input, signal } from '@angular/core';

/** The machine's own photo, fetched with the access token (an <img src> could not send it). */
@Component({
  selector: 'sw-machine-photo',
  template: `
    @if (url(); as u) {
      <img [src]="u" [alt]="alt()" />
    }
  `,
  styles: `
    img {
      display: block;
      width: 100%;
      max-width: 360px;
      height: auto;
      border-radius: 8px;
      border: 1px solid var(--mat-sys-outline-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachinePhoto {
  private readonly http = inject(HttpClient);
  readonly machineId = input.required<string>();
  /** Changes when the machine gets another photo, so the new one is fetched. */
  readonly photoId = input.required<string>();
  readonly alt = input('Photo of the machine');
  protected readonly url = signal<string | null>(null);

  constructor() {
    effect((onCleanup) => {
      this.photoId();
      const sub = this.http.get(`/api/machines/${this.machineId()}/photo`, { responseType: 'blob' }).subscribe({
        next: (blob) => {
          const url = URL.createObjectURL(blob);
          this.url.set(url);
          onCleanup(() => URL.revokeObjectURL(url));
        },
        error: () => this.url.set(null),
      });
      onCleanup(() => sub.unsubscribe());
    });
  }
}
