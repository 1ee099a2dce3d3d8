import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A tank filled (charged) from a lacquer lot: the start of a bath's age and pot life. */
export class BathCharge extends Model<InferAttributes<BathCharge>, InferCreationAttributes<BathCharge>> {
  declare id: CreationOptional<number>;
  declare tankAssetId: number;
  declare lotId: number;
  declare chargedAt: Date;
  declare massKg: number;
  declare potLifeDays: number;
  declare note: string | null;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    BathCharge.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        tankAssetId: { type: DataTypes.INTEGER, allowNull: false },
        lotId: { type: DataTypes.INTEGER, allowNull: false },
        chargedAt: { type: DataTypes.DATE, allowNull: false },
        massKg: { type: DataTypes.DOUBLE, allowNull: false, field: 'mass_kg' },
        potLifeDays: { type: DataTypes.DOUBLE, allowNull: false, field: 'pot_life_days' },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'bath_charges' },
    );
  }
}
