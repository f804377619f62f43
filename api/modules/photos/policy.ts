import type { Role } from '../../contracts/roles';
import type { Person } from '../people/repository';
import type { PhotoRecord } from './repository';

/** Roles that take photos at the machine (auditors only read). */
export const TAKES_PHOTOS: readonly Role[] = ['trainee', 'competent_person', 'workshop_admin'];

/** Roles that see the photos on records once a photo is attached to one. */
const SEES_ATTACHED: readonly Role[] = ['competent_person', 'auditor', 'workshop_admin'];

/**
 * The one rule for who may see a photo: its uploader always; once it is attached to a
 * record, competent persons, auditors and workshop admins too. Nobody else.
 */
export function canSeePhoto(person: Pick<Person, 'id' | 'roles'>, photo: Pick<PhotoRecord, 'ownerId' | 'attachedRecordId'>): boolean {
  if (photo.ownerId === person.id) return true;
  if (photo.attachedRecordId === null) return false;
  return person.roles.some((r) => SEES_ATTACHED.includes(r));
}
