import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { SignatureRecord } from './audit-entry.ts';

/**
 * One version of a process window (a lacquer × substrate recipe's limits): a draft, then
 * effective from its signed approval, then superseded by the next approved version.
 */
export class ProcessWindow extends Model<InferAttributes<ProcessWindow>, InferCreationAttributes<ProcessWindow>> {
  declare id: CreationOptional<number>;
  declare lacquerId: number;
  declare materialId: number;
  declare version: number;
  declare name: string;
  declare status: CreationOptional<string>;
  declare limits: object;
  declare note: string | null;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare approvedBy: CreationOptional<number | null>;
  declare approvedSignature: CreationOptional<SignatureRecord | null>;
  declare effectiveFrom: CreationOptional<Date | null>;
  declare supersededAt: CreationOptional<Date | null>;

  static initModel(sequelize: Sequelize) {
    ProcessWindow.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        lacquerId: { type: DataTypes.INTEGER, allowNull: false },
        materialId: { type: DataTypes.INTEGER, allowNull: false },
        version: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.TEXT, allowNull: false },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'draft' },
        limits: { type: DataTypes.JSONB, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        updatedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        approvedBy: { type: DataTypes.INTEGER, allowNull: true },
        approvedSignature: { type: DataTypes.JSONB, allowNull: true },
        effectiveFrom: { type: DataTypes.DATE, allowNull: true },
        supersededAt: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, tableName: 'process_windows' },
    );
  }
}
