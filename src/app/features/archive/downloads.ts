import { DOCUMENT, inject, Injectable } from '@angular/core';

/** Hands a downloaded file to the browser to save. */
@Injectable({ providedIn: 'root' })
export class Downloads {
  private readonly document = inject(DOCUMENT);

  save(blob: Blob, fileName: string): void {
    const url = URL.createObjectURL(blob);
    const a = this.document.createElement('a');
    a.href = url;
    a.download = fileName;
    a.rel = 'noopener';
    a.style.display = 'none';
    this.document.body.appendChild(a);
    a.click();
    a.remove();
    // Give the browser time to start the download before the blob goes.
    setTimeout(() => URL.revokeObjectURL(url), 60_000);
  }
}
