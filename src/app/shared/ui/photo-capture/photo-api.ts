import { HttpClient, type HttpEvent } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import type { Observable } from 'rxjs';
import { PHOTO_FIELD, type PhotoView } from '@setwright/contracts/photos';
import { ownErrors } from '../../../core/session';

/**
 * The photo calls. Each one handles its own problems (no snackbar): the capture component
 * shows them beside the photo they belong to.
 */
@Injectable({ providedIn: 'root' })
export class PhotoApi {
  private readonly http = inject(HttpClient);

  /** Upload one photo, reporting progress as it goes. */
  upload(file: Blob, fileName: string): Observable<HttpEvent<PhotoView>> {
    const form = new FormData();
    form.append(PHOTO_FIELD, file, fileName);
    return this.http.post<PhotoView>('/api/photos', form, { reportProgress: true, observe: 'events', context: ownErrors() });
  }

  /** The thumbnail's bytes (an <img> could not send the access token, so it comes through HttpClient). */
  thumbnail(id: string): Observable<Blob> {
    return this.http.get(`/api/photos/${encodeURIComponent(id)}/thumb`, { responseType: 'blob', context: ownErrors() });
  }

  /** The display rendition's bytes, for a larger view. */
  display(id: string): Observable<Blob> {
    return this.http.get(`/api/photos/${encodeURIComponent(id)}/display`, { responseType: 'blob', context: ownErrors() });
  }

  describe(id: string): Observable<PhotoView> {
    return this.http.get<PhotoView>(`/api/photos/${encodeURIComponent(id)}`, { context: ownErrors() });
  }

  remove(id: string): Observable<void> {
    return this.http.delete<void>(`/api/photos/${encodeURIComponent(id)}`, { context: ownErrors() });
  }
}
