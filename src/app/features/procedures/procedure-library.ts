import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { ProcedureVersionSummary } from '@setwright/contracts/procedures';
import { toProblem } from '../../core/problem';
import { Session } from '../../core/session';
import { ProcedureApi } from './procedure-api';
import { machineKindLabel } from './procedure-words';
import { StatusChip } from './status-chip';

/** One procedure and all its versions, newest first. */
export interface ProcedureEntry {
  key: string;
  title: string;
  machineKind: string;
  versions: ProcedureVersionSummary[];
  approved: ProcedureVersionSummary | null;
  draft: ProcedureVersionSummary | null;
}

/** Group version summaries by procedure, titled by the approved version (or the newest). */
export function groupByProcedure(rows: readonly ProcedureVersionSummary[]): ProcedureEntry[] {
  const byKey = new Map<string, ProcedureVersionSummary[]>();
  for (const r of rows) byKey.set(r.key, [...(byKey.get(r.key) ?? []), r]);
  return [...byKey.entries()]
    .map(([key, versions]) => {
      const sorted = [...versions].sort((a, b) => b.version - a.version);
      const approved = sorted.find((v) => v.status === 'approved') ?? null;
      const named = approved ?? sorted[0]!;
      return { key, title: named.title, machineKind: named.machineKind, versions: sorted, approved, draft: sorted.find((v) => v.status === 'draft') ?? null };
    })
    .sort((a, b) => a.title.localeCompare(b.title));
}

/** The procedure library: every procedure with its versions and their states. */
@Component({
  selector: 'sw-procedure-library',
  imports: [DatePipe, MatButtonModule, MatCardModule, MatIconModule, MatProgressBarModule, RouterLink, StatusChip],
  templateUrl: './procedure-library.html',
  styleUrl: './procedure-library.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProcedureLibrary {
  private readonly api = inject(ProcedureApi);
  private readonly router = inject(Router);
  private readonly session = inject(Session);

  protected readonly library = rxResource({ stream: () => this.api.library() });
  protected readonly procedures = computed(() => groupByProcedure(this.library.value() ?? []));
  protected readonly isAdmin = computed(() => this.session.hasAnyRole(['workshop_admin']));
  protected readonly starting = signal<string | null>(null);
  protected readonly problem = signal<{ key: string; text: string } | null>(null);
  protected readonly machineKind = machineKindLabel;

  protected async startDraft(p: ProcedureEntry) {
    this.starting.set(p.key);
    this.problem.set(null);
    try {
      const draft = await this.api.startDraft(p.key);
      await this.router.navigate(['/procedures', draft.key, 'versions', draft.version]);
    } catch (err) {
      const problem = toProblem(err);
      this.problem.set({ key: p.key, text: problem.detail ?? problem.title });
    } finally {
      this.starting.set(null);
    }
  }
}
