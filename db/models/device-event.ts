import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A device going online or offline (broker connection events, last wills, status messages). */
export class DeviceEvent extends Model<InferAttributes<DeviceEvent>, InferCreationAttributes<DeviceEvent>> {
  declare id: CreationOptional<number>;
  declare deviceId: number;
  declare kind: 'online' | 'offline';
  declare reason: string | null;
  declare at: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    DeviceEvent.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        deviceId: { type: DataTypes.INTEGER, allowNull: false },
        kind: { type: DataTypes.TEXT, allowNull: false, validate: { isIn: [['online', 'offline']] } },
        reason: { type: DataTypes.TEXT, allowNull: true },
        at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'device_events' },
    );
  }
}
