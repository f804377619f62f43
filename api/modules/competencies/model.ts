import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { AuthorisationEnd } from '../../contracts/competencies';
import type { User } from '../people/model';

/**
 * A competent person's authorisation of someone to run a procedure, until a date. Kept as history:
 * it is only ever ended (revoked, or replaced by a renewal), never edited or deleted.
 */
export class Authorisation extends Model<InferAttributes<Authorisation>, InferCreationAttributes<Authorisation>> {
  declare id: CreationOptional<string>;
  declare personId: string;
  declare procedureKey: string;
  declare grantedById: string;
  declare grantedAt: Date;
  /** The last day it is valid, YYYY-MM-DD. */
  declare expiresOn: string;
  declare note: string | null;
  declare endedAt: CreationOptional<Date | null>;
  declare endedById: CreationOptional<string | null>;
  declare endKind: CreationOptional<AuthorisationEnd | null>;
  declare endReason: CreationOptional<string | null>;
  declare person?: NonAttribute<User>;
  declare grantedBy?: NonAttribute<User>;
  declare endedBy?: NonAttribute<User | null>;

  static initModel(sequelize: Sequelize) {
    Authorisation.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        personId: { type: DataTypes.UUID, allowNull: false },
        procedureKey: { type: DataTypes.STRING(60), allowNull: false },
        grantedById: { type: DataTypes.UUID, allowNull: false },
        grantedAt: { type: DataTypes.DATE, allowNull: false },
        expiresOn: { type: DataTypes.DATEONLY, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: true },
        endedAt: { type: DataTypes.DATE, allowNull: true },
        endedById: { type: DataTypes.UUID, allowNull: true },
        endKind: { type: DataTypes.ENUM('revoked', 'renewed'), allowNull: true },
        endReason: { type: DataTypes.TEXT, allowNull: true },
      },
      { sequelize, tableName: 'competency_authorisations', timestamps: false },
    );
  }
}
