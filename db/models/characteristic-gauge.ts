import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** Which gauge measures an SPC characteristic (at most one per characteristic). */
export class CharacteristicGauge extends Model<
  InferAttributes<CharacteristicGauge>,
  InferCreationAttributes<CharacteristicGauge>
> {
  declare characteristicId: number;
  declare gaugeId: number;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CharacteristicGauge.init(
      {
        characteristicId: { type: DataTypes.INTEGER, primaryKey: true },
        gaugeId: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'characteristic_gauges' },
    );
  }
}
