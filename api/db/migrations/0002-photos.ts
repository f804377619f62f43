import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

/** Photo evidence: the row describes the two stored renditions; the original's bytes are hashed, never kept. */
export const up: Migration['up'] = async ({ context: q }) => {
  // A new object each time: Sequelize writes into the attribute objects it is given.
    const size = () => ({ type: DataTypes.INTEGER, allowNull: false });
  await q.createTable('photos', {
    id: { type: DataTypes.UUID, primaryKey: true },
    owner_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
    original_type: { type: DataTypes.STRING(40), allowNull: false },
    original_bytes: size(),
    original_width: size(),
    original_height: size(),
    sha256: { type: DataTypes.CHAR(64), allowNull: false },
    content_type: { type: DataTypes.STRING(40), allowNull: false },
    display_key: { type: DataTypes.STRING(200), allowNull: false, unique: true },
    display_width: size(),
    display_height: size(),
    display_bytes: size(),
    display_sha256: { type: DataTypes.CHAR(64), allowNull: false },
    thumb_key: { type: DataTypes.STRING(200), allowNull: false, unique: true },
    thumb_width: size(),
    thumb_height: size(),
    thumb_bytes: size(),
    thumb_sha256: { type: DataTypes.CHAR(64), allowNull: false },
    // Set when a later step attaches the photo to a record; no foreign key until records exist.
    attached_record_id: { type: DataTypes.UUID, allowNull: true },
    attached_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
    updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await q.addIndex('photos', ['owner_id', 'created_at']);
  await q.addIndex('photos', ['attached_record_id']);
  await q.sequelize.query(
    `ALTER TABLE photos ADD CONSTRAINT photos_sizes_positive CHECK (
       original_width > 0 AND original_height > 0 AND original_bytes > 0
       AND display_width > 0 AND display_height > 0 AND display_bytes > 0
       AND thumb_width > 0 AND thumb_height > 0 AND thumb_bytes > 0)`,
  );
  await q.sequelize.query(
    `ALTER TABLE photos ADD CONSTRAINT photos_attached_together CHECK ((attached_record_id IS NULL) = (attached_at IS NULL))`,
  );
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('photos');
};
