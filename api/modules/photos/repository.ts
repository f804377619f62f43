import { Op } from 'sequelize';
import { Photo } from './model';

/** A photo row as plain data. */
export interface PhotoRecord {
  id: string;
  ownerId: string;
  originalType: string;
  originalBytes: number;
  originalWidth: number;
  originalHeight: number;
  sha256: string;
  contentType: string;
  displayKey: string;
  displayWidth: number;
  displayHeight: number;
  displayBytes: number;
  displaySha256: string;
  thumbKey: string;
  thumbWidth: number;
  thumbHeight: number;
  thumbBytes: number;
  thumbSha256: string;
  attachedRecordId: string | null;
  attachedAt: Date | null;
  createdAt: Date;
}

export type NewPhoto = Omit<PhotoRecord, 'attachedRecordId' | 'attachedAt' | 'createdAt'>;

function toRecord(p: Photo): PhotoRecord {
  const { updatedAt: _updated, ...plain } = p.get({ plain: true });
  return plain;
}

export async function insertPhoto(photo: NewPhoto): Promise<PhotoRecord> {
  return toRecord(await Photo.create(photo));
}

export async function findPhoto(id: string): Promise<PhotoRecord | null> {
  const row = await Photo.findByPk(id);
  return row ? toRecord(row) : null;
}

/** Delete the row only if it still belongs to this owner and is still unattached; true when it was deleted. */
export async function deleteUnattachedPhoto(id: string, ownerId: string): Promise<boolean> {
  const count = await Photo.destroy({ where: { id, ownerId, attachedRecordId: { [Op.is]: null } } });
  return count === 1;
}
