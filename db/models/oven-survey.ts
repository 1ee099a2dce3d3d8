import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** An oven temperature-uniformity survey: per-sensor summary, result and the class table judged against. */
export class OvenSurvey extends Model<InferAttributes<OvenSurvey>, InferCreationAttributes<OvenSurvey>> {
  declare id: CreationOptional<number>;
  declare ovenAssetId: number;
  declare surveyedAt: Date;
  declare setpointC: number;
  declare sensors: unknown;
  declare stabilisedFrom: Date | null;
  declare stabilisedAuto: CreationOptional<boolean>;
  declare hottestDeviationC: number;
  declare coldestDeviationC: number;
  declare uniformityClass: number | null;
  declare classTableName: string;
  declare classTable: unknown;
  declare result: unknown;
  declare note: string | null;
  declare recordedBy: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    OvenSurvey.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        ovenAssetId: { type: DataTypes.INTEGER, allowNull: false },
        surveyedAt: { type: DataTypes.DATE, allowNull: false },
        setpointC: { type: DataTypes.DOUBLE, allowNull: false, field: 'setpoint_c' },
        sensors: { type: DataTypes.JSONB, allowNull: false },
        stabilisedFrom: { type: DataTypes.DATE, allowNull: true },
        stabilisedAuto: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        hottestDeviationC: { type: DataTypes.DOUBLE, allowNull: false, field: 'hottest_deviation_c' },
        coldestDeviationC: { type: DataTypes.DOUBLE, allowNull: false, field: 'coldest_deviation_c' },
        uniformityClass: { type: DataTypes.INTEGER, allowNull: true },
        classTableName: { type: DataTypes.TEXT, allowNull: false },
        classTable: { type: DataTypes.JSONB, allowNull: false },
        result: { type: DataTypes.JSONB, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: true },
        recordedBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'oven_surveys' },
    );
  }
}
