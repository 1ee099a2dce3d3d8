import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * A bath check: the raw reading (cup + efflux seconds, or a measured kinematic viscosity) and
 * the viscosity the server computed from it, with the charge and window in force at the time.
 */
export class BathCheck extends Model<InferAttributes<BathCheck>, InferCreationAttributes<BathCheck>> {
  declare id: CreationOptional<number>;
  declare tankAssetId: number;
  declare chargeId: number | null;
  declare at: Date;
  declare byUser: number | null;
  declare byLabel: string;
  declare cup: string | null;
  declare effluxSeconds: number | null;
  declare measuredMm2s: number | null;
  declare kinematicMm2s: number;
  declare method: string;
  declare densityGCm3: number | null;
  declare dynamicMpas: number | null;
  declare bathTempC: number | null;
  declare solidsPct: number | null;
  declare windowId: number | null;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    BathCheck.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        tankAssetId: { type: DataTypes.INTEGER, allowNull: false },
        chargeId: { type: DataTypes.INTEGER, allowNull: true },
        at: { type: DataTypes.DATE, allowNull: false },
        byUser: { type: DataTypes.INTEGER, allowNull: true },
        byLabel: { type: DataTypes.TEXT, allowNull: false },
        cup: { type: DataTypes.TEXT, allowNull: true },
        effluxSeconds: { type: DataTypes.DOUBLE, allowNull: true, field: 'efflux_seconds' },
        measuredMm2s: { type: DataTypes.DOUBLE, allowNull: true, field: 'measured_mm2s' },
        kinematicMm2s: { type: DataTypes.DOUBLE, allowNull: false, field: 'kinematic_mm2s' },
        method: { type: DataTypes.TEXT, allowNull: false },
        densityGCm3: { type: DataTypes.DOUBLE, allowNull: true, field: 'density_g_cm3' },
        dynamicMpas: { type: DataTypes.DOUBLE, allowNull: true, field: 'dynamic_mpas' },
        bathTempC: { type: DataTypes.DOUBLE, allowNull: true, field: 'bath_temp_c' },
        solidsPct: { type: DataTypes.DOUBLE, allowNull: true, field: 'solids_pct' },
        windowId: { type: DataTypes.INTEGER, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'bath_checks' },
    );
  }
}
