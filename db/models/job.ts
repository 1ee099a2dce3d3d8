import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type JobStatus = 'active' | 'held' | 'released' | 'recoat' | 'scrapped';

/** One customer job (a pair or a tray of lenses) as it moves through dip, cure and test. */
export class Job extends Model<InferAttributes<Job>, InferCreationAttributes<Job>> {
  declare id: CreationOptional<number>;
  declare jobNumber: string;
  declare customerRef: CreationOptional<string | null>;
  declare lensMaterial: CreationOptional<string | null>;
  declare materialId: CreationOptional<number | null>;
  declare status: CreationOptional<JobStatus>;
  declare note: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Job.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        jobNumber: { type: DataTypes.TEXT, allowNull: false, unique: true },
        customerRef: { type: DataTypes.TEXT, allowNull: true },
        lensMaterial: { type: DataTypes.TEXT, allowNull: true },
        materialId: { type: DataTypes.INTEGER, allowNull: true },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'active' },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE },
        updatedAt: { type: DataTypes.DATE },
      },
      { sequelize, tableName: 'jobs' },
    );
  }
}
