import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One state transition of an alarm (activate, clear, ack, shelve, …, escalate), with who and why. */
export class AlarmEvent extends Model<InferAttributes<AlarmEvent>, InferCreationAttributes<AlarmEvent>> {
  declare id: CreationOptional<number>;
  declare alarmId: number;
  declare at: Date;
  declare event: string;
  declare fromState: string | null;
  declare toState: string;
  declare active: boolean;
  declare userId: number | null;
  declare comment: string | null;

  static initModel(sequelize: Sequelize) {
    AlarmEvent.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        alarmId: { type: DataTypes.INTEGER, allowNull: false },
        at: { type: DataTypes.DATE, allowNull: false },
        event: { type: DataTypes.TEXT, allowNull: false },
        fromState: { type: DataTypes.TEXT, allowNull: true },
        toState: { type: DataTypes.TEXT, allowNull: false },
        active: { type: DataTypes.BOOLEAN, allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: true },
        comment: { type: DataTypes.TEXT, allowNull: true },
      },
      { sequelize, tableName: 'alarm_events' },
    );
  }
}
