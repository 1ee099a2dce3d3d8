import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

import type { CureVerdictName, StoredCureRecord } from '../../src/lib/shared/jobs.ts';

/** One oven load: opened and closed by the cycle (auto) or by hand, with its cure record and verdict. */
export class OvenLoad extends Model<InferAttributes<OvenLoad>, InferCreationAttributes<OvenLoad>> {
  declare id: CreationOptional<number>;
  declare ovenAssetId: number;
  declare openedAt: Date;
  declare closedAt: CreationOptional<Date | null>;
  declare openedBy: 'auto' | 'user';
  declare openedByUser: CreationOptional<number | null>;
  declare closedBy: CreationOptional<'auto' | 'user' | null>;
  declare closedByUser: CreationOptional<number | null>;
  declare status: CreationOptional<'open' | 'closed'>;
  declare windowId: CreationOptional<number | null>;
  declare record: CreationOptional<StoredCureRecord | null>;
  declare verdict: CreationOptional<CureVerdictName | null>;
  declare computedAt: CreationOptional<Date | null>;
  declare alarmId: CreationOptional<number | null>;
  declare note: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    OvenLoad.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        ovenAssetId: { type: DataTypes.INTEGER, allowNull: false },
        openedAt: { type: DataTypes.DATE, allowNull: false },
        closedAt: { type: DataTypes.DATE, allowNull: true },
        openedBy: { type: DataTypes.TEXT, allowNull: false },
        openedByUser: { type: DataTypes.INTEGER, allowNull: true },
        closedBy: { type: DataTypes.TEXT, allowNull: true },
        closedByUser: { type: DataTypes.INTEGER, allowNull: true },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'open' },
        windowId: { type: DataTypes.INTEGER, allowNull: true },
        record: { type: DataTypes.JSONB, allowNull: true },
        verdict: { type: DataTypes.TEXT, allowNull: true },
        computedAt: { type: DataTypes.DATE, allowNull: true },
        alarmId: { type: DataTypes.INTEGER, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: true },
        createdAt: { type: DataTypes.DATE },
      },
      { sequelize, tableName: 'oven_loads' },
    );
  }
}
