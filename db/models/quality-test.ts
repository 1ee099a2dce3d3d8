import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

import type { Acceptance, TestKind, TestResult } from '../../src/lib/shared/quality.ts';

/** One quality test of a job, judged when recorded against a stored copy of the acceptance settings. */
export class QualityTest extends Model<InferAttributes<QualityTest>, InferCreationAttributes<QualityTest>> {
  declare id: CreationOptional<number>;
  declare jobId: number;
  declare kind: TestKind;
  declare testedAt: Date;
  declare testedBy: number | null;
  declare testedByLabel: string;
  declare inputs: Record<string, unknown>;
  declare computed: Record<string, unknown>;
  declare result: TestResult;
  declare reasons: CreationOptional<string[]>;
  declare boilCycles: number | null;
  declare acceptance: Acceptance;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    QualityTest.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        jobId: { type: DataTypes.INTEGER, allowNull: false },
        kind: { type: DataTypes.TEXT, allowNull: false },
        testedAt: { type: DataTypes.DATE, allowNull: false },
        testedBy: { type: DataTypes.INTEGER, allowNull: true },
        testedByLabel: { type: DataTypes.TEXT, allowNull: false },
        inputs: { type: DataTypes.JSONB, allowNull: false },
        computed: { type: DataTypes.JSONB, allowNull: false },
        result: { type: DataTypes.TEXT, allowNull: false },
        reasons: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        boilCycles: { type: DataTypes.INTEGER, allowNull: true },
        acceptance: { type: DataTypes.JSONB, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE },
      },
      { sequelize, tableName: 'quality_tests' },
    );
  }
}
