import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A rack (or tray) that carries jobs through the dip line and into the oven. */
export class Rack extends Model<InferAttributes<Rack>, InferCreationAttributes<Rack>> {
  declare id: CreationOptional<number>;
  declare code: string;
  declare kind: CreationOptional<'rack' | 'tray'>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Rack.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        code: { type: DataTypes.TEXT, allowNull: false, unique: true },
        kind: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'rack' },
        createdAt: { type: DataTypes.DATE },
      },
      { sequelize, tableName: 'racks' },
    );
  }
}
