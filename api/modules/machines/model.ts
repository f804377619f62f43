import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ScheduleTrigger } from '../../contracts/schedules';

export class Machine extends Model<InferAttributes<Machine>, InferCreationAttributes<Machine>> {
  declare id: CreationOptional<string>;
  declare name: string;
  declare assetTag: string;
  declare location: CreationOptional<string>;
  declare kind: string;
  declare model: CreationOptional<string>;
  declare spec: CreationOptional<Record<string, unknown>>;
  declare photoId: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Machine.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        name: { type: DataTypes.STRING(120), allowNull: false },
        assetTag: { type: DataTypes.STRING(40), allowNull: false, unique: true },
        location: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
        kind: { type: DataTypes.STRING(40), allowNull: false },
        model: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
        spec: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        photoId: { type: DataTypes.UUID, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'machines' },
    );
  }
}

export type MachineEventKind = 'registered' | 'relocated' | 'changed';

/** The register's own history of a machine: when it was registered, moved or changed, and by whom. */
export class MachineEvent extends Model<InferAttributes<MachineEvent>, InferCreationAttributes<MachineEvent>> {
  declare id: CreationOptional<string>;
  declare machineId: string;
  declare kind: MachineEventKind;
  declare actorId: string | null;
  declare detail: CreationOptional<Record<string, unknown>>;
  declare at: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    MachineEvent.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        machineId: { type: DataTypes.UUID, allowNull: false },
        kind: { type: DataTypes.ENUM('registered', 'relocated', 'changed'), allowNull: false },
        actorId: { type: DataTypes.UUID, allowNull: true },
        detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'machine_events', timestamps: false },
    );
  }
}

/** When one procedure is due on one machine: every so many days, and/or after certain events. */
export class MachineSchedule extends Model<InferAttributes<MachineSchedule>, InferCreationAttributes<MachineSchedule>> {
  declare id: CreationOptional<string>;
  declare machineId: string;
  declare procedureKey: string;
  declare intervalDays: number | null;
  declare triggers: ScheduleTrigger[];
  declare allowedWhileTaggedOut: boolean;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    MachineSchedule.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        machineId: { type: DataTypes.UUID, allowNull: false },
        procedureKey: { type: DataTypes.STRING(60), allowNull: false },
        intervalDays: { type: DataTypes.INTEGER, allowNull: true },
        triggers: { type: DataTypes.ARRAY(DataTypes.STRING(30)), allowNull: false, defaultValue: [] },
        allowedWhileTaggedOut: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'machine_schedules' },
    );
  }
}
