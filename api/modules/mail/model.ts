import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export const MESSAGE_KINDS = [
  'awaiting_sign_off',
  'record_returned',
  'machine_tagged_out',
  'due_this_week',
  'authorisation_expiring',
  'invitation',
] as const;
export type MessageKind = (typeof MESSAGE_KINDS)[number];
export type OutboxStatus = 'queued' | 'sent' | 'failed';

/**
 * One e-mail in the outbox: written in the same transaction as the job that delivers it, marked
 * sent once the relay has taken it. The row, not the job, says whether it went, so it goes once.
 */
export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
  declare id: CreationOptional<string>;
  declare kind: MessageKind;
  declare toAddress: string;
  declare toName: CreationOptional<string>;
  declare subject: string;
  declare textBody: string;
  declare htmlBody: string;
  declare recordId: CreationOptional<string | null>;
  declare status: CreationOptional<OutboxStatus>;
  declare attempts: CreationOptional<number>;
  declare lastError: CreationOptional<string | null>;
  declare messageId: CreationOptional<string | null>;
  declare sentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    OutboxMessage.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        kind: { type: DataTypes.STRING(40), allowNull: false },
        toAddress: { type: DataTypes.STRING(254), allowNull: false },
        toName: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
        subject: { type: DataTypes.STRING(300), allowNull: false },
        textBody: { type: DataTypes.TEXT, allowNull: false },
        htmlBody: { type: DataTypes.TEXT, allowNull: false },
        recordId: { type: DataTypes.UUID, allowNull: true },
        status: { type: DataTypes.ENUM('queued', 'sent', 'failed'), allowNull: false, defaultValue: 'queued' },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        lastError: { type: DataTypes.TEXT, allowNull: true },
        messageId: { type: DataTypes.STRING(200), allowNull: true },
        sentAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'outbox_messages' },
    );
  }
}
