import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** Failed sign-ins per key (`user:<name>` or `ip:<address>`), kept across restarts. */
export class LoginThrottle extends Model<InferAttributes<LoginThrottle>, InferCreationAttributes<LoginThrottle>> {
  declare key: string;
  declare failures: CreationOptional<number>;
  declare lastFailureAt: Date | null;
  declare lockedUntil: Date | null;

  static initModel(sequelize: Sequelize) {
    LoginThrottle.init(
      {
        key: { type: DataTypes.TEXT, primaryKey: true },
        failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        lastFailureAt: { type: DataTypes.DATE, allowNull: true },
        lockedUntil: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, tableName: 'login_throttles' },
    );
  }
}
