import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * One alarm occurrence of a source (`sourceKey`): its ISA-18.2 state, whether the condition is
 * active, and who acknowledged it. A source has at most one alarm in any state but `normal`.
 */
export class Alarm extends Model<InferAttributes<Alarm>, InferCreationAttributes<Alarm>> {
  declare id: CreationOptional<number>;
  declare sourceKind: string;
  declare sourceKey: string;
  declare sourceLabel: string;
  declare assetId: number | null;
  declare channelId: number | null;
  declare characteristicId: number | null;
  declare loadId: number | null;
  declare priority: string;
  declare message: string;
  declare value: number | null;
  declare limitValue: number | null;
  declare state: string;
  declare active: boolean;
  declare raisedAt: Date;
  declare lastActivatedAt: Date;
  declare clearedAt: Date | null;
  declare ackedAt: Date | null;
  declare ackedBy: number | null;
  declare shelvedUntil: Date | null;
  declare escalationStepsSent: CreationOptional<number[]>;
  declare activationCount: CreationOptional<number>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Alarm.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        sourceKind: { type: DataTypes.TEXT, allowNull: false },
        sourceKey: { type: DataTypes.TEXT, allowNull: false },
        sourceLabel: { type: DataTypes.TEXT, allowNull: false },
        assetId: { type: DataTypes.INTEGER, allowNull: true },
        channelId: { type: DataTypes.INTEGER, allowNull: true },
        characteristicId: { type: DataTypes.INTEGER, allowNull: true },
        loadId: { type: DataTypes.INTEGER, allowNull: true },
        priority: { type: DataTypes.TEXT, allowNull: false },
        message: { type: DataTypes.TEXT, allowNull: false },
        value: { type: DataTypes.DOUBLE, allowNull: true },
        limitValue: { type: DataTypes.DOUBLE, allowNull: true },
        state: { type: DataTypes.TEXT, allowNull: false },
        active: { type: DataTypes.BOOLEAN, allowNull: false },
        raisedAt: { type: DataTypes.DATE, allowNull: false },
        lastActivatedAt: { type: DataTypes.DATE, allowNull: false },
        clearedAt: { type: DataTypes.DATE, allowNull: true },
        ackedAt: { type: DataTypes.DATE, allowNull: true },
        ackedBy: { type: DataTypes.INTEGER, allowNull: true },
        shelvedUntil: { type: DataTypes.DATE, allowNull: true },
        escalationStepsSent: { type: DataTypes.ARRAY(DataTypes.INTEGER), allowNull: false, defaultValue: [] },
        activationCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        updatedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'alarms' },
    );
  }
}
