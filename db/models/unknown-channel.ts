import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A topic of a known device that no channel matches, listed for an engineer to approve or dismiss. */
export class UnknownChannel extends Model<InferAttributes<UnknownChannel>, InferCreationAttributes<UnknownChannel>> {
  declare id: CreationOptional<number>;
  declare deviceId: number;
  declare topic: string;
  declare assetCode: string;
  declare channelKey: string;
  declare firstSeenAt: CreationOptional<Date>;
  declare lastSeenAt: CreationOptional<Date>;
  declare messages: CreationOptional<number>;
  declare samplePayload: string | null;
  declare resolvedAt: Date | null;
  declare resolution: string | null;

  static initModel(sequelize: Sequelize) {
    UnknownChannel.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        deviceId: { type: DataTypes.INTEGER, allowNull: false },
        topic: { type: DataTypes.TEXT, allowNull: false, unique: true },
        assetCode: { type: DataTypes.TEXT, allowNull: false },
        channelKey: { type: DataTypes.TEXT, allowNull: false },
        firstSeenAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        lastSeenAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        messages: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        samplePayload: { type: DataTypes.TEXT, allowNull: true },
        resolvedAt: { type: DataTypes.DATE, allowNull: true },
        resolution: { type: DataTypes.TEXT, allowNull: true },
      },
      { sequelize, tableName: 'unknown_channels' },
    );
  }
}
