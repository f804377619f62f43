import { QueryTypes, type Transaction } from 'sequelize';
import type { Role } from '../../contracts/roles';
import { RoleAssignment, User } from './model';

/** A person as the rest of the API sees them: plain data, never a model instance. */
export interface Person {
  id: string;
  email: string;
  displayName: string;
  active: boolean;
  roles: Role[];
}

export interface PersonWithHash extends Person {
  passwordHash: string;
}

function toPerson(user: User): PersonWithHash {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    active: user.active,
    roles: (user.roleAssignments ?? []).map((r) => r.role).sort(),
    passwordHash: user.passwordHash,
  };
}

const withRoles = { include: [{ model: RoleAssignment, as: 'roleAssignments' }] };

export async function findPersonByEmail(email: string): Promise<PersonWithHash | null> {
  const user = await User.findOne({ where: { email: email.trim().toLowerCase() }, ...withRoles });
  return user ? toPerson(user) : null;
}

/**
 * One person with their roles, in one lean statement: every signed-in request asks this (so a
 * deactivated person's tokens stop at once), so it skips building model instances.
 */
export async function findPersonById(id: string): Promise<Person | null> {
  const rows = await User.sequelize!.query<{ id: string; email: string; display_name: string; active: boolean; roles: Role[] }>(
    `SELECT u.id, u.email, u.display_name, u.active,
            coalesce(array_agg(r.role::text ORDER BY r.role::text COLLATE "C") FILTER (WHERE r.role IS NOT NULL), '{}') AS roles
       FROM users u LEFT JOIN role_assignments r ON r.user_id = u.id
      WHERE u.id = $1
      GROUP BY u.id`,
    { bind: [id], type: QueryTypes.SELECT },
  );
  const row = rows[0];
  return row ? { id: row.id, email: row.email, displayName: row.display_name, active: row.active, roles: row.roles } : null;
}

/** Create a person with roles, or bring an existing one (by email) up to the given roles. */
export async function upsertPerson(
  input: { email: string; displayName: string; passwordHash: string; roles: Role[]; active?: boolean },
  transaction?: Transaction,
): Promise<Person> {
  const email = input.email.trim().toLowerCase();
  let user = await User.findOne({ where: { email }, transaction });
  if (!user) {
    user = await User.create(
      { email, displayName: input.displayName, passwordHash: input.passwordHash, active: input.active ?? true },
      { transaction },
    );
  }
  for (const role of input.roles) {
    await RoleAssignment.findOrCreate({ where: { userId: user.id, role }, transaction });
  }
  const person = await findPersonById(user.id);
  return person!;
}

export async function setActive(id: string, active: boolean): Promise<void> {
  await User.update({ active }, { where: { id } });
}

/** Active people holding any of these roles, each once, by name. */
export async function activePeopleWithRoles(roles: Role[]): Promise<Person[]> {
  const holders = await RoleAssignment.findAll({ where: { role: roles }, attributes: ['userId'] });
  const ids = [...new Set(holders.map((h) => h.userId))];
  if (!ids.length) return [];
  const users = await User.findAll({ where: { id: ids, active: true }, ...withRoles, order: [['displayName', 'ASC']] });
  return users.map((u) => {
    const { passwordHash: _hidden, ...person } = toPerson(u);
    return person;
  });
}
