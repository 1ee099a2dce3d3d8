import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A bath filter replaced (type and rating). */
export class FilterChange extends Model<InferAttributes<FilterChange>, InferCreationAttributes<FilterChange>> {
  declare id: CreationOptional<number>;
  declare tankAssetId: number;
  declare at: Date;
  declare byUser: number | null;
  declare byLabel: string;
  declare filterType: string;
  declare ratingUm: number | null;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    FilterChange.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        tankAssetId: { type: DataTypes.INTEGER, allowNull: false },
        at: { type: DataTypes.DATE, allowNull: false },
        byUser: { type: DataTypes.INTEGER, allowNull: true },
        byLabel: { type: DataTypes.TEXT, allowNull: false },
        filterType: { type: DataTypes.TEXT, allowNull: false },
        ratingUm: { type: DataTypes.DOUBLE, allowNull: true, field: 'rating_um' },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'filter_changes' },
    );
  }
}
