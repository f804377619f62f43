import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * One photo: its two stored JPEG renditions (display and thumbnail) and the SHA-256 of the
 * bytes that were uploaded. Original width and height are as the photo stands upright
 * (after its EXIF orientation).
 */
export class Photo extends Model<InferAttributes<Photo>, InferCreationAttributes<Photo>> {
  declare id: string;
  declare ownerId: string;
  declare originalType: string;
  declare originalBytes: number;
  declare originalWidth: number;
  declare originalHeight: number;
  declare sha256: string;
  declare contentType: string;
  declare displayKey: string;
  declare displayWidth: number;
  declare displayHeight: number;
  declare displayBytes: number;
  declare displaySha256: string;
  declare thumbKey: string;
  declare thumbWidth: number;
  declare thumbHeight: number;
  declare thumbBytes: number;
  declare thumbSha256: string;
  declare attachedRecordId: CreationOptional<string | null>;
  declare attachedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    // A new object each time: Sequelize writes into the attribute objects it is given.
    const size = () => ({ type: DataTypes.INTEGER, allowNull: false });
    Photo.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true },
        ownerId: { type: DataTypes.UUID, allowNull: false },
        originalType: { type: DataTypes.STRING(40), allowNull: false },
        originalBytes: size(),
        originalWidth: size(),
        originalHeight: size(),
        sha256: { type: DataTypes.CHAR(64), allowNull: false },
        contentType: { type: DataTypes.STRING(40), allowNull: false },
        displayKey: { type: DataTypes.STRING(200), allowNull: false, unique: true },
        displayWidth: size(),
        displayHeight: size(),
        displayBytes: size(),
        displaySha256: { type: DataTypes.CHAR(64), allowNull: false },
        thumbKey: { type: DataTypes.STRING(200), allowNull: false, unique: true },
        thumbWidth: size(),
        thumbHeight: size(),
        thumbBytes: size(),
        thumbSha256: { type: DataTypes.CHAR(64), allowNull: false },
        attachedRecordId: { type: DataTypes.UUID, allowNull: true },
        attachedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'photos' },
    );
  }
}
