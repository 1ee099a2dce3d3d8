import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class UserSession extends Model<InferAttributes<UserSession>, InferCreationAttributes<UserSession>> {
  declare id: string;
  declare userId: number;
  declare expiresAt: Date;
  /** For the absolute lifetime (sliding expiry never extends a session past it). */
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    UserSession.init(
      {
        id: { type: DataTypes.TEXT, primaryKey: true },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        createdAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'user_sessions' },
    );
  }
}
