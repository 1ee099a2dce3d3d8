import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** Solvent or fresh lacquer added to a bath, with the mass-balance recommendation it followed (if any). */
export class BathAddition extends Model<InferAttributes<BathAddition>, InferCreationAttributes<BathAddition>> {
  declare id: CreationOptional<number>;
  declare tankAssetId: number;
  declare chargeId: number | null;
  declare at: Date;
  declare byUser: number | null;
  declare byLabel: string;
  declare kind: 'solvent' | 'fresh-lacquer';
  declare massKg: number;
  declare lotId: number | null;
  declare checkId: number | null;
  declare recommendation: unknown;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    BathAddition.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        tankAssetId: { type: DataTypes.INTEGER, allowNull: false },
        chargeId: { type: DataTypes.INTEGER, allowNull: true },
        at: { type: DataTypes.DATE, allowNull: false },
        byUser: { type: DataTypes.INTEGER, allowNull: true },
        byLabel: { type: DataTypes.TEXT, allowNull: false },
        kind: { type: DataTypes.TEXT, allowNull: false },
        massKg: { type: DataTypes.DOUBLE, allowNull: false, field: 'mass_kg' },
        lotId: { type: DataTypes.INTEGER, allowNull: true },
        checkId: { type: DataTypes.BIGINT, allowNull: true },
        recommendation: { type: DataTypes.JSONB, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'bath_additions' },
    );
  }
}
