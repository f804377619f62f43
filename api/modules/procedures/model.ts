import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Procedure } from '../../../procedures/schema';

export type ProcedureStatus = 'draft' | 'approved' | 'retired';

export class ProcedureVersion extends Model<InferAttributes<ProcedureVersion>, InferCreationAttributes<ProcedureVersion>> {
  declare id: CreationOptional<string>;
  declare key: string;
  declare version: number;
  declare title: string;
  declare machineKind: string;
  declare status: ProcedureStatus;
  declare body: Procedure;
  declare checksum: string;
  declare source: 'pack' | 'editor';
  declare authorId: CreationOptional<string | null>;
  declare approvedById: CreationOptional<string | null>;
  declare approvedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ProcedureVersion.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        key: { type: DataTypes.STRING(60), allowNull: false },
        version: { type: DataTypes.INTEGER, allowNull: false },
        title: { type: DataTypes.STRING(120), allowNull: false },
        machineKind: { type: DataTypes.STRING(40), allowNull: false },
        status: { type: DataTypes.ENUM('draft', 'approved', 'retired'), allowNull: false },
        body: { type: DataTypes.JSONB, allowNull: false },
        checksum: { type: DataTypes.STRING(64), allowNull: false },
        source: { type: DataTypes.ENUM('pack', 'editor'), allowNull: false },
        authorId: { type: DataTypes.UUID, allowNull: true },
        approvedById: { type: DataTypes.UUID, allowNull: true },
        approvedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'procedure_versions' },
    );
  }
}
