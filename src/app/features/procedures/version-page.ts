import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTabsModule } from '@angular/material/tabs';
import { Router, RouterLink } from '@angular/router';
import { of } from 'rxjs';
import type { ProcedureVersionDetail } from '@setwright/contracts/procedures';
import { diffProcedures } from '@setwright/procedures/diff';
import type { Procedure } from '@setwright/procedures/schema';
import { toProblem } from '../../core/problem';
import { Session } from '../../core/session';
import { DiffView } from './diff-view';
import { DraftEditor } from './editor/draft-editor';
import { ProcedureApi } from './procedure-api';
import { StatusChip } from './status-chip';
import { VersionView } from './version-view';

/**
 * One version of a procedure: read it, see how it differs from the approved version, and, for a
 * draft, edit it (its author) or approve it (a competent person or admin who did not write it).
 * The server checks every one of these permissions; this page only hides what it would refuse.
 */
@Component({
  selector: 'sw-version-page',
  imports: [DatePipe, MatButtonModule, MatIconModule, MatProgressBarModule, MatTabsModule, RouterLink, StatusChip, VersionView, DiffView, DraftEditor],
  templateUrl: './version-page.html',
  styleUrl: './version-page.scss',
  host: { '(window:beforeunload)': 'onBeforeUnload($event)' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionPage {
  private readonly api = inject(ProcedureApi);
  private readonly session = inject(Session);
  private readonly router = inject(Router);

  /** From the route. */
  readonly key = input.required<string>();
  readonly version = input.required<string>();
  private readonly number = computed(() => Number(this.version()));

  protected readonly detail = rxResource({ params: () => ({ key: this.key(), version: this.number() }), stream: ({ params }) => this.api.get(params.key, params.version) });
  protected readonly versions = rxResource({ params: () => this.key(), stream: ({ params }) => this.api.versions(params) });
  protected readonly approved = computed(() => this.versions.value()?.find((v) => v.status === 'approved') ?? null);
  protected readonly openDraft = computed(() => this.versions.value()?.find((v) => v.status === 'draft') ?? null);
  /** The approved version's body, to compare with (not needed when this is the approved version). */
  protected readonly approvedBody = rxResource({
    params: () => {
      const a = this.approved();
      return a && a.version !== this.number() ? { key: a.key, version: a.version } : undefined;
    },
    stream: ({ params }) => (params ? this.api.get(params.key, params.version) : of(null)),
  });

  /** What the editor holds now, when it passes every check; otherwise the saved body is compared. */
  private readonly liveBody = signal<Procedure | null>(null);
  protected readonly current = computed(() => this.liveBody() ?? this.detail.value()?.body ?? null);
  protected readonly diff = computed(() => {
    const from = this.approvedBody.value()?.body;
    const to = this.current();
    return from && to ? diffProcedures(from, to) : null;
  });

  private readonly me = computed(() => this.session.user()?.id ?? null);
  private readonly isAdmin = computed(() => this.session.hasAnyRole(['workshop_admin']));
  protected readonly isAuthor = computed(() => !!this.detail.value()?.author && this.detail.value()?.author?.id === this.me());
  private readonly isDraft = computed(() => this.detail.value()?.status === 'draft');
  protected readonly canEdit = computed(() => this.isDraft() && this.isAuthor() && this.isAdmin());
  protected readonly canApprove = computed(() => this.isDraft() && !this.isAuthor() && this.session.hasAnyRole(['competent_person', 'workshop_admin']));
  protected readonly canDelete = computed(() => this.isDraft() && (this.isAuthor() || this.isAdmin()));
  protected readonly canStartDraft = computed(() => this.isAdmin() && !this.isDraft() && !!this.versions.value() && !this.openDraft());

  protected readonly confirming = signal<'approve' | 'delete' | null>(null);
  /** The editor holds changes that are not saved yet. */
  protected readonly unsaved = signal(false);
  protected readonly busy = signal(false);
  protected readonly actionProblem = signal<string | null>(null);

  /** Asked by the router before leaving, and by the browser before the tab closes. */
  mayLeave(): boolean {
    return !this.unsaved() || window.confirm('Leave this draft without saving? Your changes since the last save will be lost.');
  }

  protected onBeforeUnload(event: BeforeUnloadEvent) {
    if (this.unsaved()) event.preventDefault();
  }

  protected onChanged(body: Procedure | null) {
    this.liveBody.set(body);
  }

  protected onSaved(saved: ProcedureVersionDetail) {
    this.detail.set(saved);
  }

  protected async approve() {
    await this.act(async () => {
      const approved = await this.api.approve(this.key(), this.number());
      this.detail.set(approved);
      this.versions.reload();
    });
  }

  protected async remove() {
    await this.act(async () => {
      await this.api.remove(this.key(), this.number());
      this.unsaved.set(false);
      await this.router.navigate(['/procedures']);
    });
  }

  protected async startDraft() {
    const d = this.detail.value();
    if (!d) return;
    await this.act(async () => {
      const draft = await this.api.startDraft(d.key, d.status === 'approved' ? undefined : d.version);
      await this.router.navigate(['/procedures', draft.key, 'versions', draft.version]);
    });
  }

  private async act(work: () => Promise<void>) {
    this.busy.set(true);
    this.actionProblem.set(null);
    try {
      await work();
      this.confirming.set(null);
    } catch (err) {
      const p = toProblem(err);
      this.actionProblem.set(p.detail ?? p.title);
    } finally {
      this.busy.set(false);
    }
  }
}
