import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { StepEvaluation } from '../../../procedures/engine';
import type { RecordResult, RecordStatus } from '../../contracts/records';
import type { Machine } from '../machines/model';
import type { User } from '../people/model';
import type { ProcedureVersion } from '../procedures/model';

export interface MachineSnapshot {
  id: string;
  name: string;
  assetTag: string;
  model: string;
  location: string;
}

/** What a record keeps of its machine when it starts. */
export function machineSnapshot(m: MachineSnapshot): MachineSnapshot {
  return { id: m.id, name: m.name, assetTag: m.assetTag, model: m.model, location: m.location };
}

export class SetupRecord extends Model<InferAttributes<SetupRecord>, InferCreationAttributes<SetupRecord>> {
  declare id: string;
  declare machineId: string;
  declare procedureVersionId: string;
  declare machineSpec: Record<string, unknown>;
  /** The machine as it stood when the record started (its name and place may change later). */
  declare machineSnapshot: CreationOptional<MachineSnapshot | null>;
  declare status: RecordStatus;
  declare result: CreationOptional<RecordResult | null>;
  declare startedById: string;
  declare finishedAt: CreationOptional<Date | null>;
  declare voidReason: CreationOptional<string | null>;
  declare recordHash: CreationOptional<string | null>;
  declare previousHash: CreationOptional<string | null>;
  declare signedAt: CreationOptional<Date | null>;
  declare pdfKey: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare machine?: NonAttribute<Machine>;
  declare procedureVersion?: NonAttribute<ProcedureVersion>;
  declare startedBy?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    SetupRecord.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true },
        machineId: { type: DataTypes.UUID, allowNull: false },
        procedureVersionId: { type: DataTypes.UUID, allowNull: false },
        machineSpec: { type: DataTypes.JSONB, allowNull: false },
        machineSnapshot: { type: DataTypes.JSONB, allowNull: true },
        status: { type: DataTypes.ENUM('underway', 'ready_for_signoff', 'signed_off', 'returned', 'voided'), allowNull: false },
        result: { type: DataTypes.ENUM('passed', 'failed'), allowNull: true },
        startedById: { type: DataTypes.UUID, allowNull: false },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        voidReason: { type: DataTypes.TEXT, allowNull: true },
        recordHash: { type: DataTypes.STRING(64), allowNull: true },
        previousHash: { type: DataTypes.STRING(64), allowNull: true },
        signedAt: { type: DataTypes.DATE, allowNull: true },
        pdfKey: { type: DataTypes.STRING(200), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'setup_records' },
    );
  }
}

export class StepEntry extends Model<InferAttributes<StepEntry>, InferCreationAttributes<StepEntry>> {
  declare id: CreationOptional<string>;
  declare recordId: string;
  declare stepId: string;
  declare attempt: number;
  declare values: Record<string, unknown>;
  declare evaluation: StepEvaluation;
  declare outcome: 'done' | 'out_of_limits';
  declare correctiveNote: string | null;
  declare enteredById: string;
  declare witnessedById: string | null;
  declare witnessedAt: Date | null;
  declare idempotencyKey: string;
  declare createdAt: CreationOptional<Date>;
  declare enteredBy?: NonAttribute<User>;
  declare witnessedBy?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    StepEntry.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        recordId: { type: DataTypes.UUID, allowNull: false },
        stepId: { type: DataTypes.STRING(60), allowNull: false },
        attempt: { type: DataTypes.INTEGER, allowNull: false },
        values: { type: DataTypes.JSONB, allowNull: false },
        evaluation: { type: DataTypes.JSONB, allowNull: false },
        outcome: { type: DataTypes.ENUM('done', 'out_of_limits'), allowNull: false },
        correctiveNote: { type: DataTypes.TEXT, allowNull: true },
        enteredById: { type: DataTypes.UUID, allowNull: false },
        witnessedById: { type: DataTypes.UUID, allowNull: true },
        witnessedAt: { type: DataTypes.DATE, allowNull: true },
        idempotencyKey: { type: DataTypes.UUID, allowNull: false, unique: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'step_entries', updatedAt: false },
    );
  }
}
