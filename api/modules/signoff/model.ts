import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type SignatureMeaning = 'performed' | 'witnessed' | 'approved';

/** An electronic signature: who, their printed name, when, and what it means (21 CFR 11.50). Never changed. */
export class Signature extends Model<InferAttributes<Signature>, InferCreationAttributes<Signature>> {
  declare id: CreationOptional<string>;
  declare recordId: string;
  declare signerId: string;
  declare meaning: SignatureMeaning;
  declare printedName: string;
  declare signedAt: Date;
  declare stepId: string | null;
  declare entryId: string | null;

  static initModel(sequelize: Sequelize) {
    Signature.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        recordId: { type: DataTypes.UUID, allowNull: false },
        signerId: { type: DataTypes.UUID, allowNull: false },
        meaning: { type: DataTypes.ENUM('performed', 'witnessed', 'approved'), allowNull: false },
        printedName: { type: DataTypes.STRING(120), allowNull: false },
        signedAt: { type: DataTypes.DATE, allowNull: false },
        stepId: { type: DataTypes.STRING(60), allowNull: true },
        entryId: { type: DataTypes.UUID, allowNull: true },
      },
      { sequelize, tableName: 'signatures', timestamps: false },
    );
  }
}

/** A record sent back to its performer, with the reason. */
export class RecordReturn extends Model<InferAttributes<RecordReturn>, InferCreationAttributes<RecordReturn>> {
  declare id: CreationOptional<string>;
  declare recordId: string;
  declare returnedById: string;
  declare reason: string;
  declare returnedAt: Date;

  static initModel(sequelize: Sequelize) {
    RecordReturn.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        recordId: { type: DataTypes.UUID, allowNull: false },
        returnedById: { type: DataTypes.UUID, allowNull: false },
        reason: { type: DataTypes.TEXT, allowNull: false },
        returnedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'record_returns', timestamps: false },
    );
  }
}

/** A signed correction or remark added to a locked record, never an edit of it. */
export class RecordAddendum extends Model<InferAttributes<RecordAddendum>, InferCreationAttributes<RecordAddendum>> {
  declare id: CreationOptional<string>;
  declare recordId: string;
  declare authorId: string;
  declare printedName: string;
  declare text: string;
  declare signedAt: Date;
  declare addendumHash: string;

  static initModel(sequelize: Sequelize) {
    RecordAddendum.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        recordId: { type: DataTypes.UUID, allowNull: false },
        authorId: { type: DataTypes.UUID, allowNull: false },
        printedName: { type: DataTypes.STRING(120), allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: false },
        signedAt: { type: DataTypes.DATE, allowNull: false },
        addendumHash: { type: DataTypes.STRING(64), allowNull: false },
      },
      { sequelize, tableName: 'record_addenda', timestamps: false },
    );
  }
}

/** What happened, when and by whom: append-only (the database refuses changes). */
export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<string>;
  declare at: CreationOptional<Date>;
  declare actorId: string | null;
  declare action: string;
  declare recordId: string | null;
  declare detail: CreationOptional<Record<string, unknown>>;

  static initModel(sequelize: Sequelize) {
    AuditEvent.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        actorId: { type: DataTypes.UUID, allowNull: true },
        action: { type: DataTypes.STRING(40), allowNull: false },
        recordId: { type: DataTypes.UUID, allowNull: true },
        detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      },
      { sequelize, tableName: 'audit_events', timestamps: false },
    );
  }
}
