import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type DipRunSource = 'scan' | 'csv' | 'seed' | 'api';

/**
 * One rack withdrawn from a line's hard-coat bath: when, the bath charge and last bath check at
 * that moment, the window in force, and the mean withdrawal speed measured over the stroke.
 */
export class DipRun extends Model<InferAttributes<DipRun>, InferCreationAttributes<DipRun>> {
  declare id: CreationOptional<number>;
  declare lineAssetId: number;
  declare tankAssetId: number | null;
  declare rackId: number | null;
  declare dippedAt: Date;
  declare bathChargeId: number | null;
  declare lastCheckId: number | null;
  declare windowId: number | null;
  /** Mean withdrawal speed over the stroke, mm/s (null: no stroke found in the readings). */
  declare withdrawalSpeedMmS: number | null;
  declare strokeStartedAt: Date | null;
  declare strokeEndedAt: Date | null;
  declare strokeSamples: number | null;
  declare source: CreationOptional<DipRunSource>;
  declare note: string | null;
  declare recordedBy: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    DipRun.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        lineAssetId: { type: DataTypes.INTEGER, allowNull: false },
        tankAssetId: { type: DataTypes.INTEGER, allowNull: true },
        rackId: { type: DataTypes.INTEGER, allowNull: true },
        dippedAt: { type: DataTypes.DATE, allowNull: false },
        bathChargeId: { type: DataTypes.INTEGER, allowNull: true },
        lastCheckId: { type: DataTypes.BIGINT, allowNull: true },
        windowId: { type: DataTypes.INTEGER, allowNull: true },
        withdrawalSpeedMmS: { type: DataTypes.DOUBLE, allowNull: true, field: 'withdrawal_speed_mm_s' },
        strokeStartedAt: { type: DataTypes.DATE, allowNull: true },
        strokeEndedAt: { type: DataTypes.DATE, allowNull: true },
        strokeSamples: { type: DataTypes.INTEGER, allowNull: true },
        source: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'scan' },
        note: { type: DataTypes.TEXT, allowNull: true },
        recordedBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE },
      },
      { sequelize, tableName: 'dip_runs' },
    );
  }
}
