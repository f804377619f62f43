import { HttpClient, HttpContext, HttpContextToken } from '@angular/common/http';
import { computed, inject, Injectable, signal } from '@angular/core';
import { Router } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import type { LoginRequest, SessionResponse, SessionUser } from '@setwright/contracts/auth';
import type { Role } from '@setwright/contracts/roles';
import { forgetUser, rememberedUser, rememberUser } from './offline/device-user';
import { toProblem } from './problem';

/** Requests marked with this handle their own problems (no snackbar, no sign-out on 401). */
export const OWN_ERRORS = new HttpContextToken<boolean>(() => false);
export const ownErrors = () => new HttpContext().set(OWN_ERRORS, true);

/**
 * Who is signed in. The access token lives only in memory; a tablet session lasts a shift
 * through the httpOnly refresh cookie, which the page itself can never read.
 */
@Injectable({ providedIn: 'root' })
export class Session {
  private readonly http = inject(HttpClient);
  private readonly router = inject(Router);
  private readonly state = signal<{ user: SessionUser; token: string; expiresAt: number } | null>(null);
  private refreshing: Promise<boolean> | null = null;
  private timer: ReturnType<typeof setTimeout> | undefined;

  readonly user = computed(() => this.state()?.user ?? null);
  readonly signedIn = computed(() => this.state() !== null);
  readonly roles = computed<Role[]>(() => this.state()?.user.roles ?? []);

  token(): string | null {
    return this.state()?.token ?? null;
  }

  hasAnyRole(roles: readonly Role[]): boolean {
    const held = this.roles();
    return roles.some((r) => held.includes(r));
  }

  async signIn(body: LoginRequest): Promise<SessionUser> {
    const res = await firstValueFrom(this.http.post<SessionResponse>('/api/auth/login', body, { context: ownErrors() }));
    this.accept(res);
    return res.user;
  }

  /**
   * Swap the refresh cookie for a new access token; false when the session has ended. Concurrent
   * callers share one request. Without a connection nothing is known to have ended: the person
   * last signed in on this tablet carries on offline, and the next request once it is back checks.
   */
  refresh(): Promise<boolean> {
    this.refreshing ??= firstValueFrom(this.http.post<SessionResponse>('/api/auth/refresh', {}, { context: ownErrors() }))
      .then((res) => {
        this.accept(res);
        return true;
      })
      .catch((err: unknown) => {
        const user = toProblem(err).status === 0 ? (this.state()?.user ?? rememberedUser()) : null;
        if (user) {
          this.state.update((s) => ({ user, token: s?.token ?? '', expiresAt: 0 }));
          return true;
        }
        this.clear();
        return false;
      })
      .finally(() => (this.refreshing = null));
    return this.refreshing;
  }

  async signOut(reason?: 'expired'): Promise<void> {
    const wasSignedIn = this.signedIn();
    forgetUser();
    this.clear();
    if (wasSignedIn) {
      await firstValueFrom(this.http.post('/api/auth/logout', {}, { context: ownErrors() })).catch(() => undefined);
    }
    await this.router.navigate(['/sign-in'], { queryParams: reason ? { ended: 1 } : {} });
  }

  private accept(res: SessionResponse) {
    this.state.set({ user: res.user, token: res.accessToken, expiresAt: Date.now() + res.expiresIn * 1000 });
    rememberUser(res.user);
    clearTimeout(this.timer);
    // Renew a minute before the access token runs out, so a long step never meets a 401.
    const renewIn = Math.max(5, res.expiresIn - 60) * 1000;
    this.timer = setTimeout(() => void this.refresh(), renewIn);
  }

  private clear() {
    clearTimeout(this.timer);
    this.state.set(null);
  }
}
