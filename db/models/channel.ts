import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One measured quantity with a unit and a valid range, published by one device. */
export class Channel extends Model<InferAttributes<Channel>, InferCreationAttributes<Channel>> {
  declare id: CreationOptional<number>;
  declare assetId: number;
  declare deviceId: number;
  declare key: string;
  declare name: string;
  declare kind: string;
  declare unit: string;
  declare min: number;
  declare max: number;
  declare rawRetentionDays: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Channel.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        assetId: { type: DataTypes.INTEGER, allowNull: false },
        deviceId: { type: DataTypes.INTEGER, allowNull: false },
        key: { type: DataTypes.TEXT, allowNull: false },
        name: { type: DataTypes.TEXT, allowNull: false },
        kind: { type: DataTypes.TEXT, allowNull: false },
        unit: { type: DataTypes.TEXT, allowNull: false },
        min: { type: DataTypes.DOUBLE, allowNull: false },
        max: { type: DataTypes.DOUBLE, allowNull: false },
        rawRetentionDays: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 400 },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'channels' },
    );
  }
}
