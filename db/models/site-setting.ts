import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One site-wide setting: a JSON value under a key (escalation rules, retention, …). */
export class SiteSetting extends Model<InferAttributes<SiteSetting>, InferCreationAttributes<SiteSetting>> {
  declare key: string;
  declare value: unknown;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SiteSetting.init(
      {
        key: { type: DataTypes.TEXT, primaryKey: true },
        value: { type: DataTypes.JSONB, allowNull: false },
        updatedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'site_settings' },
    );
  }
}
