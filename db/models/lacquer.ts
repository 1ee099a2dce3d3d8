import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A hard-coat lacquer: its nominal solids (the bath's target), density and cure activation energy. */
export class Lacquer extends Model<InferAttributes<Lacquer>, InferCreationAttributes<Lacquer>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare maker: string;
  declare solidsPct: number;
  declare densityGCm3: number;
  declare activationEnergyKjMol: number;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Lacquer.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.TEXT, allowNull: false, unique: true },
        maker: { type: DataTypes.TEXT, allowNull: false },
        solidsPct: { type: DataTypes.DOUBLE, allowNull: false, field: 'solids_pct' },
        densityGCm3: { type: DataTypes.DOUBLE, allowNull: false, field: 'density_g_cm3' },
        activationEnergyKjMol: { type: DataTypes.DOUBLE, allowNull: false, field: 'activation_energy_kj_mol' },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'lacquers' },
    );
  }
}
