import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * An engineer's alarm settings for one channel (limits, deadband, delays, stale data) or for
 * one characteristic (on/off and priority of its control-chart alarms): exactly one of
 * `channelId` and `characteristicId` is set.
 */
export class AlarmConfig extends Model<InferAttributes<AlarmConfig>, InferCreationAttributes<AlarmConfig>> {
  declare id: CreationOptional<number>;
  declare channelId: number | null;
  declare characteristicId: number | null;
  declare enabled: CreationOptional<boolean>;
  declare limitsMode: CreationOptional<string>;
  declare high: number | null;
  declare low: number | null;
  declare deadband: CreationOptional<number>;
  declare onDelayMs: CreationOptional<number>;
  declare offDelayMs: CreationOptional<number>;
  declare priority: CreationOptional<string>;
  declare onlyWhileRunning: CreationOptional<boolean>;
  declare label: string | null;
  declare staleSeconds: number | null;
  declare stalePriority: CreationOptional<string>;
  declare note: string | null;
  declare updatedAt: CreationOptional<Date>;
  declare updatedBy: number | null;

  static initModel(sequelize: Sequelize) {
    AlarmConfig.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        channelId: { type: DataTypes.INTEGER, allowNull: true },
        characteristicId: { type: DataTypes.INTEGER, allowNull: true },
        enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        limitsMode: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'absolute' },
        high: { type: DataTypes.DOUBLE, allowNull: true },
        low: { type: DataTypes.DOUBLE, allowNull: true },
        deadband: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        onDelayMs: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        offDelayMs: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        priority: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'medium' },
        onlyWhileRunning: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        label: { type: DataTypes.TEXT, allowNull: true },
        staleSeconds: { type: DataTypes.INTEGER, allowNull: true },
        stalePriority: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'high' },
        note: { type: DataTypes.TEXT, allowNull: true },
        updatedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        updatedBy: { type: DataTypes.INTEGER, allowNull: true },
      },
      { sequelize, tableName: 'alarm_configs' },
    );
  }
}
