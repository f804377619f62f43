import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { firstValueFrom } from 'rxjs';
import { PERSON_STATE_LABELS, type PersonSummary } from '@setwright/contracts/people';
import { Session } from '../../core/session';
import { ConfirmDialog, type ConfirmDialogData } from './confirm-dialog';
import { InviteDialog } from './invite-dialog';
import { PeopleApi } from './people-api';
import { PeopleTabs } from './people-tabs';
import { roleLabel } from './role-words';
import { RolesDialog, type RolesDialogData } from './roles-dialog';

/** People: everyone who signs in, their roles and state; invite, change roles, deactivate and reactivate. */
@Component({
  selector: 'sw-people-list',
  imports: [DatePipe, MatButtonModule, MatChipsModule, MatIconModule, MatProgressBarModule, PeopleTabs],
  templateUrl: './people-list.html',
  styleUrl: './people-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PeopleList {
  private readonly api = inject(PeopleApi);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly session = inject(Session);

  protected readonly people = rxResource({ stream: () => this.api.list() });
  protected readonly me = computed(() => this.session.user()?.id);
  /** The person whose change is on its way to the server. */
  protected readonly busyId = signal<string | null>(null);
  protected readonly stateLabel = (p: PersonSummary) => PERSON_STATE_LABELS[p.state];
  protected readonly roleLabel = roleLabel;
  protected readonly linkRanOut = (p: PersonSummary) => !!p.invitationExpiresAt && Date.parse(p.invitationExpiresAt) <= Date.now();

  protected async invite() {
    const person = await firstValueFrom(this.dialog.open(InviteDialog, { width: '560px', maxWidth: '95vw', autoFocus: 'first-tabbable' }).afterClosed());
    if (!person) return;
    this.replace(person, true);
    this.snackBar.open(`Invitation on its way to ${person.email}.`, 'OK', { duration: 6000 });
  }

  protected async editRoles(person: PersonSummary) {
    const data: RolesDialogData = { person, self: person.id === this.me() };
    const changed = await firstValueFrom(this.dialog.open(RolesDialog, { data, width: '560px', maxWidth: '95vw' }).afterClosed());
    if (changed) this.replace(changed);
  }

  protected async deactivate(person: PersonSummary) {
    const ok = await this.confirm({
      title: `Deactivate ${person.displayName}?`,
      text: `${person.displayName} will be signed out everywhere at once and cannot sign in until a workshop admin reactivates them. Their records and signatures stay as they are.`,
      action: 'Deactivate',
    });
    if (ok) await this.change(person, () => this.api.deactivate(person.id));
  }

  protected async reactivate(person: PersonSummary) {
    const ok = await this.confirm({
      title: `Reactivate ${person.displayName}?`,
      text: `${person.displayName} can sign in again with their own password. If they never set one, they go back to invited and need a new link.`,
      action: 'Reactivate',
    });
    if (ok) await this.change(person, () => this.api.reactivate(person.id));
  }

  protected async resend(person: PersonSummary) {
    if (await this.change(person, () => this.api.resendInvitation(person.id))) {
      this.snackBar.open(`A new link is on its way to ${person.email}. Earlier links no longer work.`, 'OK', { duration: 6000 });
    }
  }

  private confirm(data: ConfirmDialogData): Promise<boolean | undefined> {
    return firstValueFrom(this.dialog.open(ConfirmDialog, { data, width: '480px', maxWidth: '95vw' }).afterClosed());
  }

  /** Run one change; the problem interceptor shows any failure. True when it went through. */
  private async change(person: PersonSummary, call: () => Promise<PersonSummary>): Promise<boolean> {
    this.busyId.set(person.id);
    try {
      this.replace(await call());
      return true;
    } catch {
      return false;
    } finally {
      this.busyId.set(null);
    }
  }

  private replace(person: PersonSummary, add = false) {
    this.people.update((list) => {
      const rest = (list ?? []).filter((p) => p.id !== person.id);
      if (!add && rest.length === (list ?? []).length) return list;
      return [...rest, person].sort((a, b) => a.displayName.localeCompare(b.displayName));
    });
  }
}
