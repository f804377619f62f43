import { HttpClient, HttpErrorResponse, type HttpResponse } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { ArchiveFilter, ArchivePage, ArchiveQuery } from '@setwright/contracts/archive';
import type { MachineSummary } from '@setwright/contracts/machines';
import type { ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { RecordCheck } from '@setwright/contracts/signoff';
import { toProblem, type Problem } from '../../core/problem';
import { ownErrors } from '../../core/session';

/** The filter as the client holds it before it becomes query parameters (dates may be left out). */
export type ArchiveFilterParams = Partial<Omit<ArchiveFilter, 'dateField'>> & { dateField?: ArchiveFilter['dateField'] };
export type ArchiveRequest = ArchiveFilterParams & Pick<ArchiveQuery, 'page' | 'size' | 'sort' | 'dir'>;

/** Only the parameters that carry a value, as strings. */
export function queryParams(values: Record<string, string | number | undefined | null>): Record<string, string> {
  const params: Record<string, string> = {};
  for (const [k, v] of Object.entries(values)) if (v !== undefined && v !== null && v !== '') params[k] = String(v);
  return params;
}

/** The name the server gave a download (Content-Disposition), or a fallback. */
export function fileNameOf(res: HttpResponse<Blob>, fallback: string): string {
  const match = /filename="([^"]+)"/.exec(res.headers.get('Content-Disposition') ?? '');
  return match?.[1] ?? fallback;
}

/** A failed blob download still carries a problem+json body: read it. */
export async function blobProblem(err: unknown): Promise<Problem> {
  const body = err instanceof HttpErrorResponse ? (err.error as unknown) : (err as { error?: unknown })?.error;
  if (body instanceof Blob) {
    try {
      const parsed = JSON.parse(await body.text()) as Problem;
      if (typeof parsed.title === 'string') return parsed;
    } catch {
      // not JSON: fall through to the general shape
    }
  }
  return toProblem(err);
}

/** Calls of the Records place: the archive list, its pick-lists, PDFs, evidence packs and record checks. */
@Injectable({ providedIn: 'root' })
export class ArchiveApi {
  private readonly http = inject(HttpClient);

  records(request: ArchiveRequest) {
    return this.http.get<ArchivePage>('/api/archive/records', { params: queryParams(request) });
  }

  machines() {
    return this.http.get<MachineSummary[]>('/api/machines');
  }

  procedures() {
    return this.http.get<ProcedureVersionSummary[]>('/api/procedures', { params: { all: '1' } });
  }

  check(recordId: string) {
    return this.http.get<RecordCheck>(`/api/records/${recordId}/check`);
  }

  /** The signed PDF as a blob (the API needs the bearer token, so a plain link would not do). */
  pdf(recordId: string): Promise<HttpResponse<Blob>> {
    return firstValueFrom(this.http.get(`/api/records/${recordId}/pdf`, { responseType: 'blob', observe: 'response', context: ownErrors() }));
  }

  /** The evidence pack as a stream of HTTP events: the headers (with the record count), progress, then the zip. */
  evidencePack(filter: ArchiveFilterParams) {
    return this.http.get('/api/archive/evidence-pack', {
      params: queryParams(filter),
      observe: 'events',
      reportProgress: true,
      responseType: 'blob',
      context: ownErrors(),
    });
  }
}
