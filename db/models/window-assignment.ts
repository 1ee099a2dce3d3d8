import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A process window (its recipe) assigned to a line, oven or coater over [validFrom, validTo). */
export class WindowAssignment extends Model<InferAttributes<WindowAssignment>, InferCreationAttributes<WindowAssignment>> {
  declare id: CreationOptional<number>;
  declare assetId: number;
  declare windowId: number;
  declare validFrom: Date;
  declare validTo: CreationOptional<Date | null>;
  declare assignedBy: number | null;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    WindowAssignment.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        assetId: { type: DataTypes.INTEGER, allowNull: false },
        windowId: { type: DataTypes.INTEGER, allowNull: false },
        validFrom: { type: DataTypes.DATE, allowNull: false },
        validTo: { type: DataTypes.DATE, allowNull: true },
        assignedBy: { type: DataTypes.INTEGER, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'window_assignments' },
    );
  }
}
