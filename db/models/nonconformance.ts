import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

import type { SignatureRecord } from './audit-entry.ts';

export type SuspectedCause = 'load' | 'bath' | 'load-and-bath' | 'other' | 'unknown';

/** A nonconformance: failed tests, the suspected cause and the holds it ties together; closed with a signature. */
export class Nonconformance extends Model<InferAttributes<Nonconformance>, InferCreationAttributes<Nonconformance>> {
  declare id: CreationOptional<number>;
  declare title: string;
  declare description: CreationOptional<string>;
  declare suspectedCause: CreationOptional<SuspectedCause>;
  declare suspectedLoadId: number | null;
  declare suspectedBathChargeId: number | null;
  declare status: CreationOptional<'open' | 'closed'>;
  declare openedAt: CreationOptional<Date>;
  declare openedBy: number | null;
  declare closedAt: CreationOptional<Date | null>;
  declare closedBy: CreationOptional<number | null>;
  declare closeSignature: CreationOptional<SignatureRecord | null>;

  static initModel(sequelize: Sequelize) {
    Nonconformance.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        title: { type: DataTypes.TEXT, allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        suspectedCause: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'unknown' },
        suspectedLoadId: { type: DataTypes.INTEGER, allowNull: true },
        suspectedBathChargeId: { type: DataTypes.INTEGER, allowNull: true },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'open' },
        openedAt: { type: DataTypes.DATE },
        openedBy: { type: DataTypes.INTEGER, allowNull: true },
        closedAt: { type: DataTypes.DATE, allowNull: true },
        closedBy: { type: DataTypes.INTEGER, allowNull: true },
        closeSignature: { type: DataTypes.JSONB, allowNull: true },
      },
      { sequelize, tableName: 'nonconformances' },
    );
  }
}
