import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { BladeMaterial, CutShape, CutUnit, RemovalReason } from '../../contracts/blades';
import type { User } from '../people/model';

/** A blade by size, pitch and material, with how many are in stock. */
export class BladeType extends Model<InferAttributes<BladeType>, InferCreationAttributes<BladeType>> {
  declare id: CreationOptional<string>;
  declare widthMm: number;
  declare thicknessMm: number;
  declare lengthMm: number;
  declare pitch: string;
  declare material: BladeMaterial;
  declare stock: CreationOptional<number>;
  declare listed: CreationOptional<boolean>;
  declare note: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    BladeType.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        widthMm: { type: DataTypes.DOUBLE, allowNull: false },
        thicknessMm: { type: DataTypes.DOUBLE, allowNull: false },
        lengthMm: { type: DataTypes.DOUBLE, allowNull: false },
        pitch: { type: DataTypes.STRING(20), allowNull: false },
        material: { type: DataTypes.ENUM('bi-metal', 'carbon'), allowNull: false },
        stock: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        listed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        note: { type: DataTypes.STRING(200), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'blade_types' },
    );
  }
}

/** One blade on one machine: fitted (in a signed blade change), and later taken off with a reason. */
export class BladeFitting extends Model<InferAttributes<BladeFitting>, InferCreationAttributes<BladeFitting>> {
  declare id: CreationOptional<string>;
  declare machineId: string;
  declare bladeTypeId: string;
  declare recordId: string | null;
  declare fittedAt: Date;
  declare fittedById: string | null;
  declare fromStock: boolean;
  declare removedAt: CreationOptional<Date | null>;
  declare removedById: CreationOptional<string | null>;
  declare removalReason: CreationOptional<RemovalReason | null>;
  declare removalNote: CreationOptional<string | null>;
  declare removalRecordId: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare bladeType?: NonAttribute<BladeType>;
  declare fittedBy?: NonAttribute<User | null>;
  declare removedBy?: NonAttribute<User | null>;

  static initModel(sequelize: Sequelize) {
    BladeFitting.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        machineId: { type: DataTypes.UUID, allowNull: false },
        bladeTypeId: { type: DataTypes.UUID, allowNull: false },
        recordId: { type: DataTypes.UUID, allowNull: true, unique: true },
        fittedAt: { type: DataTypes.DATE, allowNull: false },
        fittedById: { type: DataTypes.UUID, allowNull: true },
        fromStock: { type: DataTypes.BOOLEAN, allowNull: false },
        removedAt: { type: DataTypes.DATE, allowNull: true },
        removedById: { type: DataTypes.UUID, allowNull: true },
        removalReason: { type: DataTypes.ENUM('worn', 'broken', 'stripped_teeth', 'wrong_pitch', 'other'), allowNull: true },
        removalNote: { type: DataTypes.TEXT, allowNull: true },
        removalRecordId: { type: DataTypes.UUID, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'blade_fittings' },
    );
  }
}

/** Cuts made with a fitted blade: the section, its sizes, how many, and the area they add up to. Append-only. */
export class BladeCutLog extends Model<InferAttributes<BladeCutLog>, InferCreationAttributes<BladeCutLog>> {
  declare id: CreationOptional<string>;
  declare fittingId: string;
  declare shape: CutShape;
  declare unit: CutUnit;
  declare sizes: Record<string, number>;
  declare count: number;
  declare areaM2: number;
  declare note: string | null;
  declare loggedById: string;
  declare loggedAt: Date;
  declare loggedBy?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    BladeCutLog.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        fittingId: { type: DataTypes.UUID, allowNull: false },
        shape: { type: DataTypes.STRING(20), allowNull: false },
        unit: { type: DataTypes.STRING(4), allowNull: false },
        sizes: { type: DataTypes.JSONB, allowNull: false },
        count: { type: DataTypes.INTEGER, allowNull: false },
        areaM2: { type: DataTypes.DOUBLE, allowNull: false },
        note: { type: DataTypes.STRING(200), allowNull: true },
        loggedById: { type: DataTypes.UUID, allowNull: false },
        loggedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'blade_cut_logs', timestamps: false },
    );
  }
}
