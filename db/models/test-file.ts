import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

import type { UploadMime } from '../../src/lib/shared/file-types.ts';

/** A file attached to a quality test or an oven survey (exactly one of the two), kept in PostgreSQL. */
export class TestFile extends Model<InferAttributes<TestFile>, InferCreationAttributes<TestFile>> {
  declare id: CreationOptional<number>;
  declare testId: number | null;
  declare surveyId: number | null;
  declare filename: string;
  declare mime: UploadMime;
  declare sizeBytes: number;
  declare sha256: string;
  declare content: Buffer;
  declare uploadedBy: number | null;
  declare uploadedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    TestFile.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        testId: { type: DataTypes.INTEGER, allowNull: true },
        surveyId: { type: DataTypes.INTEGER, allowNull: true },
        filename: { type: DataTypes.TEXT, allowNull: false },
        mime: { type: DataTypes.TEXT, allowNull: false },
        sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
        sha256: { type: DataTypes.TEXT, allowNull: false },
        content: { type: DataTypes.BLOB, allowNull: false },
        uploadedBy: { type: DataTypes.INTEGER, allowNull: true },
        uploadedAt: { type: DataTypes.DATE },
      },
      { sequelize, tableName: 'test_files' },
    );
  }
}
