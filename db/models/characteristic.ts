import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * A charted quality characteristic: which channels feed it, how readings form subgroups
 * (`subgroupRule`, n = `subgroupSize`), the chart and its rules, and where its specification
 * comes from. JSON fields follow `src/lib/shared/characteristics.ts`.
 */
export class Characteristic extends Model<InferAttributes<Characteristic>, InferCreationAttributes<Characteristic>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare description: CreationOptional<string>;
  declare assetId: number;
  declare channelIds: number[];
  declare subgroupRule: object;
  declare subgroupSize: CreationOptional<number>;
  declare chart: string;
  declare chartParams: CreationOptional<object>;
  declare rules: CreationOptional<string[]>;
  declare spec: CreationOptional<object>;
  declare unit: string;
  declare active: CreationOptional<boolean>;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Characteristic.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.TEXT, allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        assetId: { type: DataTypes.INTEGER, allowNull: false },
        channelIds: { type: DataTypes.ARRAY(DataTypes.INTEGER), allowNull: false },
        subgroupRule: { type: DataTypes.JSONB, allowNull: false },
        subgroupSize: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        chart: { type: DataTypes.TEXT, allowNull: false },
        chartParams: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        rules: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: ['we1'] },
        spec: { type: DataTypes.JSONB, allowNull: false, defaultValue: { mode: 'none' } },
        unit: { type: DataTypes.TEXT, allowNull: false },
        active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        createdBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        updatedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'characteristics' },
    );
  }
}
