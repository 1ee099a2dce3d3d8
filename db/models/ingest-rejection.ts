import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A message (or some samples of one) the ingest worker refused, with its raw payload and the reason. */
export class IngestRejection extends Model<InferAttributes<IngestRejection>, InferCreationAttributes<IngestRejection>> {
  declare id: CreationOptional<number>;
  declare receivedAt: CreationOptional<Date>;
  declare topic: string;
  declare deviceUsername: string | null;
  declare channelId: number | null;
  declare reason: string;
  declare detail: string | null;
  declare payload: string;

  static initModel(sequelize: Sequelize) {
    IngestRejection.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        receivedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        topic: { type: DataTypes.TEXT, allowNull: false },
        deviceUsername: { type: DataTypes.TEXT, allowNull: true },
        channelId: { type: DataTypes.INTEGER, allowNull: true },
        reason: { type: DataTypes.TEXT, allowNull: false },
        detail: { type: DataTypes.TEXT, allowNull: true },
        payload: { type: DataTypes.TEXT, allowNull: false },
      },
      { sequelize, tableName: 'ingest_rejections' },
    );
  }
}
