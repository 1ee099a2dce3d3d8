import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A failed test tied to a nonconformance. */
export class NcTest extends Model<InferAttributes<NcTest>, InferCreationAttributes<NcTest>> {
  declare ncId: number;
  declare testId: number;

  static initModel(sequelize: Sequelize) {
    NcTest.init(
      {
        ncId: { type: DataTypes.INTEGER, primaryKey: true },
        testId: { type: DataTypes.INTEGER, primaryKey: true },
      },
      { sequelize, tableName: 'nc_tests' },
    );
  }
}
