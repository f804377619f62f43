import type { SessionUser } from '@setwright/contracts/auth';

/**
 * Who last signed in on this tablet (no token, no password: only who they are), so that a page
 * reloaded without a connection can go on showing that person's work. The refresh cookie stays
 * the only proof of a session: the first request once the connection is back checks it.
 */
const KEY = 'setwright.device-user';

export function rememberUser(user: SessionUser): void {
  try {
    localStorage.setItem(KEY, JSON.stringify(user));
  } catch {
    // storage full or refused: the tablet simply cannot carry on offline after a reload
  }
}

export function rememberedUser(): SessionUser | null {
  try {
    const raw = localStorage.getItem(KEY);
    const user = raw ? (JSON.parse(raw) as Partial<SessionUser>) : null;
    const whole = !!user && typeof user.id === 'string' && typeof user.email === 'string' && typeof user.displayName === 'string' && Array.isArray(user.roles);
    return whole ? (user as SessionUser) : null;
  } catch {
    return null;
  }
}

export function forgetUser(): void {
  try {
    localStorage.removeItem(KEY);
  } catch {
    // nothing to forget
  }
}
