import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** An MQTT publisher identity (PLC gateway, sensor box) with its own credentials. */
export class Device extends Model<InferAttributes<Device>, InferCreationAttributes<Device>> {
  declare id: CreationOptional<number>;
  declare siteId: number;
  declare name: string;
  declare username: string;
  declare passwordHash: string;
  declare topicPrefix: string;
  declare enabled: CreationOptional<boolean>;
  declare online: CreationOptional<boolean>;
  declare lastSeenAt: Date | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Device.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        siteId: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.TEXT, allowNull: false },
        username: { type: DataTypes.TEXT, allowNull: false, unique: true },
        passwordHash: { type: DataTypes.TEXT, allowNull: false },
        topicPrefix: { type: DataTypes.TEXT, allowNull: false, unique: true },
        enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        online: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        lastSeenAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'devices' },
    );
  }
}
