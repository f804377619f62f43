import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
};

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('users', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    display_name: { type: DataTypes.STRING(120), allowNull: false },
    password_hash: { type: DataTypes.STRING(100), allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    ...timestamps,
  });
  await q.sequelize.query(`ALTER TABLE users ADD CONSTRAINT users_email_lower CHECK (email = lower(email))`);

  await q.createTable('role_assignments', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    user_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    role: { type: DataTypes.ENUM('trainee', 'competent_person', 'auditor', 'workshop_admin'), allowNull: false },
    ...timestamps,
  });
  await q.addIndex('role_assignments', ['user_id', 'role'], { unique: true });

  await q.createTable('refresh_tokens', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    user_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  });
  await q.addIndex('refresh_tokens', ['user_id']);

  await q.createTable('machines', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    name: { type: DataTypes.STRING(120), allowNull: false },
    asset_tag: { type: DataTypes.STRING(40), allowNull: false, unique: true },
    location: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    model: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
    spec: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    ...timestamps,
  });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('machines');
  await q.dropTable('refresh_tokens');
  await q.dropTable('role_assignments');
  await q.dropTable('users');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_role_assignments_role"');
};
