import bcrypt from 'bcryptjs';
import { Op } from 'sequelize';
import type { SessionResponse } from '../../contracts/auth';
import { AppError } from '../../lib/errors';
import { findPersonByEmail, findPersonById, type Person } from '../people/repository';
import { RefreshToken } from './model';
import { hashRefreshToken, newRefreshToken, type TokenService } from './tokens';

const SIGN_IN_FAILED = 'That email and password do not match an active account.';

/** A bcrypt hash of nothing anyone knows, compared against when the email is unknown, so both cases take as long. */
let decoyHash: string | undefined;

export interface IssuedSession {
  response: SessionResponse;
  refreshToken: string;
  refreshExpires: Date;
}

export class AuthService {
  constructor(
    private readonly tokens: TokenService,
    private readonly refreshHours: number,
    private readonly bcryptCost: number,
  ) {}

  /** The active person these credentials belong to, or null; unknown, wrong and deactivated take the same time. */
  async checkCredentials(email: string, password: string): Promise<Person | null> {
    const person = await findPersonByEmail(email);
    decoyHash ??= await bcrypt.hash('decoy: nobody signs in with this', this.bcryptCost);
    const ok = await bcrypt.compare(password, person?.passwordHash || decoyHash);
    if (!person || !ok || !person.active) return null;
    const { passwordHash: _hidden, ...plain } = person;
    return plain;
  }

  /** Check email and password; unknown, wrong and deactivated all fail the same way. */
  async signIn(email: string, password: string): Promise<IssuedSession> {
    const person = await this.checkCredentials(email, password);
    if (!person) {
      throw new AppError(401, 'sign-in-failed', 'Sign-in failed', SIGN_IN_FAILED, [
        { pointer: '#/password', detail: SIGN_IN_FAILED },
      ]);
    }
    return this.issue(person);
  }

  /** Swap a refresh token for a new pair; a token used twice revokes every session of its owner. */
  async refresh(value: string | undefined): Promise<IssuedSession> {
    const expired = AppError.unauthorised('Your session has ended. Sign in again.');
    if (!value) throw expired;
    const row = await RefreshToken.findOne({ where: { tokenHash: hashRefreshToken(value) } });
    if (!row) throw expired;
    if (row.revokedAt) {
      await RefreshToken.update({ revokedAt: new Date() }, { where: { userId: row.userId, revokedAt: null } });
      throw expired;
    }
    if (row.expiresAt <= new Date()) throw expired;
    const person = await findPersonById(row.userId);
    if (!person || !person.active) throw expired;
    const [count] = await RefreshToken.update(
      { revokedAt: new Date() },
      { where: { id: row.id, revokedAt: { [Op.is]: null } } },
    );
    if (count !== 1) throw expired;
    return this.issue(person);
  }

  async signOut(value: string | undefined): Promise<void> {
    if (!value) return;
    await RefreshToken.update({ revokedAt: new Date() }, { where: { tokenHash: hashRefreshToken(value), revokedAt: null } });
  }

  private async issue(person: Person): Promise<IssuedSession> {
    const refresh = newRefreshToken();
    const refreshExpires = new Date(Date.now() + this.refreshHours * 3600_000);
    await RefreshToken.create({ userId: person.id, tokenHash: refresh.hash, expiresAt: refreshExpires });
    return {
      response: {
        accessToken: this.tokens.signAccess(person),
        expiresIn: this.tokens.accessSeconds,
        user: { id: person.id, email: person.email, displayName: person.displayName, roles: person.roles },
      },
      refreshToken: refresh.value,
      refreshExpires,
    };
  }
}
