import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A message caught by the local fake SMTP server (development and tests only). */
export class OutboxMail extends Model<InferAttributes<OutboxMail>, InferCreationAttributes<OutboxMail>> {
  declare id: CreationOptional<number>;
  declare caughtAt: CreationOptional<Date>;
  declare mailFrom: string | null;
  declare mailTo: string;
  declare subject: string | null;
  declare body: string;

  static initModel(sequelize: Sequelize) {
    OutboxMail.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        caughtAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
        mailFrom: { type: DataTypes.TEXT, allowNull: true },
        mailTo: { type: DataTypes.TEXT, allowNull: false },
        subject: { type: DataTypes.TEXT, allowNull: true },
        body: { type: DataTypes.TEXT, allowNull: false },
      },
      { sequelize, tableName: 'outbox_mail' },
    );
  }
}
