import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A job carried by a dip run (the rack's contents at the dip). */
export class DipRunJob extends Model<InferAttributes<DipRunJob>, InferCreationAttributes<DipRunJob>> {
  declare dipRunId: number;
  declare jobId: number;

  static initModel(sequelize: Sequelize) {
    DipRunJob.init(
      {
        dipRunId: { type: DataTypes.INTEGER, primaryKey: true },
        jobId: { type: DataTypes.INTEGER, primaryKey: true },
      },
      { sequelize, tableName: 'dip_run_jobs' },
    );
  }
}
