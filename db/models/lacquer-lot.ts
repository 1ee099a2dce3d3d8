import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A received lot of a lacquer (dates as 'YYYY-MM-DD'; its measured solids per the certificate). */
export class LacquerLot extends Model<InferAttributes<LacquerLot>, InferCreationAttributes<LacquerLot>> {
  declare id: CreationOptional<number>;
  declare lacquerId: number;
  declare lotCode: string;
  declare receivedOn: string;
  declare expiresOn: string;
  declare solidsPct: number;
  declare note: string | null;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LacquerLot.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        lacquerId: { type: DataTypes.INTEGER, allowNull: false },
        lotCode: { type: DataTypes.TEXT, allowNull: false },
        receivedOn: { type: DataTypes.DATEONLY, allowNull: false },
        expiresOn: { type: DataTypes.DATEONLY, allowNull: false },
        solidsPct: { type: DataTypes.DOUBLE, allowNull: false, field: 'solids_pct' },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'lacquer_lots' },
    );
  }
}
