import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A job in an oven load (scanned by itself or with its rack). */
export class LoadJob extends Model<InferAttributes<LoadJob>, InferCreationAttributes<LoadJob>> {
  declare loadId: number;
  declare jobId: number;
  declare rackId: number | null;
  declare addedAt: CreationOptional<Date>;
  declare addedBy: number | null;

  static initModel(sequelize: Sequelize) {
    LoadJob.init(
      {
        loadId: { type: DataTypes.INTEGER, primaryKey: true },
        jobId: { type: DataTypes.INTEGER, primaryKey: true },
        rackId: { type: DataTypes.INTEGER, allowNull: true },
        addedAt: { type: DataTypes.DATE },
        addedBy: { type: DataTypes.INTEGER, allowNull: true },
      },
      { sequelize, tableName: 'load_jobs' },
    );
  }
}
