import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One measurement-system study of a gauge: its readings (`data`), the computed result and the verdict. */
export class GaugeStudy extends Model<InferAttributes<GaugeStudy>, InferCreationAttributes<GaugeStudy>> {
  declare id: CreationOptional<number>;
  declare gaugeId: number;
  declare kind: 'grr' | 'bias' | 'linearity';
  declare method: 'anova' | 'average-range' | 'bias' | 'linearity';
  declare title: string;
  declare tolerance: number | null;
  declare data: unknown;
  declare result: unknown;
  declare verdict: 'acceptable' | 'conditional' | 'unacceptable';
  declare studiedAt: Date;
  declare recordedBy: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    GaugeStudy.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        gaugeId: { type: DataTypes.INTEGER, allowNull: false },
        kind: { type: DataTypes.TEXT, allowNull: false },
        method: { type: DataTypes.TEXT, allowNull: false },
        title: { type: DataTypes.TEXT, allowNull: false },
        tolerance: { type: DataTypes.DOUBLE, allowNull: true },
        data: { type: DataTypes.JSONB, allowNull: false },
        result: { type: DataTypes.JSONB, allowNull: false },
        verdict: { type: DataTypes.TEXT, allowNull: false },
        studiedAt: { type: DataTypes.DATE, allowNull: false },
        recordedBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'gauge_studies' },
    );
  }
}
