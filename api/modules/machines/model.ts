import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class Machine extends Model<InferAttributes<Machine>, InferCreationAttributes<Machine>> {
  declare id: CreationOptional<string>;
  declare name: string;
  declare assetTag: string;
  declare location: CreationOptional<string>;
  declare kind: string;
  declare model: CreationOptional<string>;
  declare spec: CreationOptional<Record<string, unknown>>;
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
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'machines' },
    );
  }
}
