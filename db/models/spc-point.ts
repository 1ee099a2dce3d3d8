import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * One plotted subgroup of a characteristic (1-based `idx`), with the centre and limits it was
 * judged against and the rules it broke. Written in bulk by the SPC engine (see spc-store).
 */
export class SpcPoint extends Model<InferAttributes<SpcPoint>, InferCreationAttributes<SpcPoint>> {
  declare id: CreationOptional<number>;
  declare characteristicId: number;
  declare idx: number;
  declare t: Date;
  declare tFrom: Date | null;
  declare value: number;
  declare observation: number;
  declare dispersion: number | null;
  declare n: number;
  declare members: number[];
  declare readings: CreationOptional<object>;
  declare extra: CreationOptional<object>;
  declare center: number | null;
  declare ucl: number | null;
  declare lcl: number | null;
  declare violations: CreationOptional<string[]>;
  declare limitSetId: number | null;
  declare excluded: CreationOptional<boolean>;
  declare exclusionReason: string | null;
  declare subgroupKey: string | null;
  declare dipRunId: number | null;
  declare ovenLoadId: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SpcPoint.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        characteristicId: { type: DataTypes.INTEGER, allowNull: false },
        idx: { type: DataTypes.INTEGER, allowNull: false },
        t: { type: DataTypes.DATE, allowNull: false },
        tFrom: { type: DataTypes.DATE, allowNull: true },
        value: { type: DataTypes.DOUBLE, allowNull: false },
        observation: { type: DataTypes.DOUBLE, allowNull: false },
        dispersion: { type: DataTypes.DOUBLE, allowNull: true },
        n: { type: DataTypes.INTEGER, allowNull: false },
        members: { type: DataTypes.ARRAY(DataTypes.DOUBLE), allowNull: false },
        readings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        extra: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        center: { type: DataTypes.DOUBLE, allowNull: true },
        ucl: { type: DataTypes.DOUBLE, allowNull: true },
        lcl: { type: DataTypes.DOUBLE, allowNull: true },
        violations: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        limitSetId: { type: DataTypes.INTEGER, allowNull: true },
        excluded: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        exclusionReason: { type: DataTypes.TEXT, allowNull: true },
        subgroupKey: { type: DataTypes.TEXT, allowNull: true },
        dipRunId: { type: DataTypes.INTEGER, allowNull: true },
        ovenLoadId: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'spc_points' },
    );
  }
}
