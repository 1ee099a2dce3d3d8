import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type GaugeKind = 'thickness' | 'haze' | 'viscosity-cup' | 'other';

/** A measuring instrument of the lab whose measurement system is studied (thickness gauge, haze meter, viscosity cup). */
export class Gauge extends Model<InferAttributes<Gauge>, InferCreationAttributes<Gauge>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare kind: GaugeKind;
  declare unit: string;
  declare resolution: number | null;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Gauge.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.TEXT, allowNull: false },
        kind: { type: DataTypes.TEXT, allowNull: false },
        unit: { type: DataTypes.TEXT, allowNull: false },
        resolution: { type: DataTypes.DOUBLE, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'gauges' },
    );
  }
}
