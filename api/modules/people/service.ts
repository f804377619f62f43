import { createHash, randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { Op, UniqueConstraintError, type Sequelize } from 'sequelize';
import type { InviteRequest, PersonSummary, SetPasswordResponse } from '../../contracts/people';
import type { Role } from '../../contracts/roles';
import { audit } from '../../lib/audit';
import { AppError } from '../../lib/errors';
import { RefreshToken } from '../auth/model';
import type { Notifier } from '../mail/notifier';
import { Invitation, NO_PASSWORD, RoleAssignment, User } from './model';
import type { Person } from './repository';

const withRoles = { include: [{ model: RoleAssignment, as: 'roleAssignments' }] };

export function hashInvitationToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

function summary(user: User, invitationExpiresAt: Date | null): PersonSummary {
  const state = user.deactivatedAt ? 'deactivated' : user.active ? 'active' : 'invited';
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    roles: (user.roleAssignments ?? []).map((r) => r.role).sort(),
    active: user.active,
    state,
    invitationExpiresAt: state === 'invited' && invitationExpiresAt ? invitationExpiresAt.toISOString() : null,
    createdAt: user.createdAt.toISOString(),
  };
}

const emailTaken = (deactivated: boolean) =>
  new AppError(409, 'email-taken', 'Already in Setwright', 'Someone with this email address is already in Setwright.', [
    {
      pointer: '#/email',
      detail: deactivated ? 'This person is here but deactivated: reactivate them instead.' : 'Someone already has this email address.',
    },
  ]);

const linkNotValid = () =>
  new AppError(422, 'invitation-not-valid', 'This link does not work', 'This link has been used already, has run out, or is not a Setwright link. Ask a workshop admin to send you a new invitation.', [
    { pointer: '#/token', detail: 'This link has been used already, has run out, or is not a Setwright link.' },
  ]);

/** People admin: the list, invitations, roles, deactivation; and setting a password from an invitation link. */
export class PeopleService {
  constructor(
    private readonly sequelize: Sequelize,
    private readonly notifier: Notifier,
    private readonly settings: { invitationHours: number; bcryptCost: number },
  ) {}

  async list(): Promise<PersonSummary[]> {
    const users = await User.findAll({ ...withRoles, order: [['displayName', 'ASC'], ['email', 'ASC']] });
    const expiries = await this.pendingExpiries();
    return users.map((u) => summary(u, expiries.get(u.id) ?? null));
  }

  async get(id: string): Promise<PersonSummary> {
    const user = await this.found(id);
    return summary(user, (await this.pendingExpiries(id)).get(id) ?? null);
  }

  /** A new person, not active until they set a password through the link e-mailed to them. */
  async invite(actor: Person, req: InviteRequest): Promise<PersonSummary> {
    const existing = await User.findOne({ where: { email: req.email } });
    if (existing) throw emailTaken(!!existing.deactivatedAt);
    let id: string;
    try {
      id = await this.sequelize.transaction(async (transaction) => {
        const user = await User.create({ email: req.email, displayName: req.displayName, passwordHash: NO_PASSWORD, active: false }, { transaction });
        for (const role of req.roles) await RoleAssignment.create({ userId: user.id, role }, { transaction });
        await this.newInvitation(actor, { id: user.id, email: user.email, displayName: user.displayName, roles: req.roles }, transaction);
        await audit('person.invited', actor.id, null, { personId: user.id, email: user.email, roles: req.roles }, transaction);
        return user.id;
      });
    } catch (err) {
      if (err instanceof UniqueConstraintError) throw emailTaken(false);
      throw err;
    }
    return this.get(id);
  }

  /** A fresh link for someone who has not set their password yet; earlier links stop working. */
  async resendInvitation(actor: Person, id: string): Promise<PersonSummary> {
    const user = await this.found(id);
    if (user.active || user.deactivatedAt) {
      throw AppError.conflict(user.active ? `${user.displayName} has set a password already and can sign in.` : `${user.displayName} is deactivated; reactivate them first.`);
    }
    const roles = (user.roleAssignments ?? []).map((r) => r.role);
    await this.sequelize.transaction(async (transaction) => {
      await User.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      await Invitation.update({ revokedAt: new Date() }, { where: { userId: id, usedAt: null, revokedAt: null }, transaction });
      await this.newInvitation(actor, { id, email: user.email, displayName: user.displayName, roles }, transaction);
      await audit('person.invitation_resent', actor.id, null, { personId: id }, transaction);
    });
    return this.get(id);
  }

  /** Replace a person's roles. Nobody removes their own workshop admin role (so there is always an admin). */
  async setRoles(actor: Person, id: string, roles: Role[]): Promise<PersonSummary> {
    const user = await this.found(id);
    if (actor.id === id && !roles.includes('workshop_admin')) {
      throw new AppError(403, 'own-admin-role', 'Not allowed', 'You cannot remove your own workshop admin role. Ask another workshop admin.', [
        { pointer: '#/roles', detail: 'Keep Workshop admin: you cannot take it from yourself.' },
      ]);
    }
    const before = (user.roleAssignments ?? []).map((r) => r.role).sort();
    await this.sequelize.transaction(async (transaction) => {
      await User.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      await RoleAssignment.destroy({ where: { userId: id, role: { [Op.notIn]: roles } }, transaction });
      for (const role of roles) await RoleAssignment.findOrCreate({ where: { userId: id, role }, transaction });
      await audit('person.roles_changed', actor.id, null, { personId: id, before, after: [...roles].sort() }, transaction);
    });
    return this.get(id);
  }

  /** Stop a person signing in: their sessions end at once and any invitation link stops working. */
  async deactivate(actor: Person, id: string): Promise<PersonSummary> {
    if (actor.id === id) throw new AppError(403, 'own-account', 'Not allowed', 'You cannot deactivate yourself. Ask another workshop admin.');
    const user = await this.found(id);
    if (!user.deactivatedAt) {
      await this.sequelize.transaction(async (transaction) => {
        const now = new Date();
        await User.update({ active: false, deactivatedAt: now }, { where: { id }, transaction });
        await RefreshToken.update({ revokedAt: now }, { where: { userId: id, revokedAt: null }, transaction });
        await Invitation.update({ revokedAt: now }, { where: { userId: id, usedAt: null, revokedAt: null }, transaction });
        await audit('person.deactivated', actor.id, null, { personId: id }, transaction);
      });
    }
    return this.get(id);
  }

  /** Let a deactivated person back in; one who never set a password goes back to invited and needs a new link. */
  async reactivate(actor: Person, id: string): Promise<PersonSummary> {
    const user = await this.found(id);
    if (user.deactivatedAt) {
      await this.sequelize.transaction(async (transaction) => {
        await User.update({ active: user.passwordHash !== NO_PASSWORD, deactivatedAt: null }, { where: { id }, transaction });
        await audit('person.reactivated', actor.id, null, { personId: id }, transaction);
      });
    }
    return this.get(id);
  }

  /** Use an invitation link once: set the password and make the account active. */
  async setPassword(token: string, password: string): Promise<SetPasswordResponse> {
    const tokenHash = hashInvitationToken(token);
    const invitation = await Invitation.findOne({ where: { tokenHash } });
    if (!invitation || invitation.usedAt || invitation.revokedAt || invitation.expiresAt <= new Date()) throw linkNotValid();
    const passwordHash = await bcrypt.hash(password, this.settings.bcryptCost);
    return this.sequelize.transaction(async (transaction) => {
      const now = new Date();
      const [used] = await Invitation.update(
        { usedAt: now },
        { where: { id: invitation.id, usedAt: null, revokedAt: null, expiresAt: { [Op.gt]: now } }, transaction },
      );
      if (used !== 1) throw linkNotValid();
      const user = await User.findByPk(invitation.userId, { transaction, lock: transaction.LOCK.UPDATE });
      if (!user || user.deactivatedAt) throw linkNotValid();
      await user.update({ passwordHash, active: true }, { transaction });
      await Invitation.update({ revokedAt: now }, { where: { userId: user.id, usedAt: null, revokedAt: null }, transaction });
      await audit('person.password_set', user.id, null, { personId: user.id, invitationId: invitation.id }, transaction);
      return { email: user.email, displayName: user.displayName };
    });
  }

  private async newInvitation(
    actor: Person,
    to: { id: string; email: string; displayName: string; roles: Role[] },
    transaction: Parameters<Notifier['invitation']>[4],
  ): Promise<void> {
    const token = randomBytes(32).toString('base64url');
    const expiresAt = new Date(Date.now() + this.settings.invitationHours * 3600_000);
    await Invitation.create({ userId: to.id, tokenHash: hashInvitationToken(token), invitedById: actor.id, expiresAt }, { transaction });
    await this.notifier.invitation(to, actor.displayName, token, expiresAt, transaction);
  }

  private async found(id: string): Promise<User> {
    const user = await User.findByPk(id, withRoles);
    if (!user) throw AppError.notFound('There is no person with that id.');
    return user;
  }

  /** The newest unused, unrevoked invitation's expiry per person (expired ones included, so the page can say so). */
  private async pendingExpiries(userId?: string): Promise<Map<string, Date>> {
    const rows = await Invitation.findAll({ where: { usedAt: null, revokedAt: null, ...(userId ? { userId } : {}) }, attributes: ['userId', 'expiresAt'] });
    const latest = new Map<string, Date>();
    for (const r of rows) {
      const seen = latest.get(r.userId);
      if (!seen || seen < r.expiresAt) latest.set(r.userId, r.expiresAt);
    }
    return latest;
  }
}
