import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

import type { SignatureRecord } from './audit-entry.ts';
import type { Disposition } from '../../src/lib/shared/quality.ts';

/** A hold on a job (at most one active per job); closed by a signed disposition. */
export class Hold extends Model<InferAttributes<Hold>, InferCreationAttributes<Hold>> {
  declare id: CreationOptional<number>;
  declare jobId: number;
  declare ncId: number | null;
  declare reason: string;
  declare placedBy: number | null;
  declare placedAt: CreationOptional<Date>;
  declare status: CreationOptional<'active' | 'closed'>;
  declare disposition: CreationOptional<Disposition | null>;
  declare dispositionComment: CreationOptional<string | null>;
  declare closedAt: CreationOptional<Date | null>;
  declare closedBy: CreationOptional<number | null>;
  declare signature: CreationOptional<SignatureRecord | null>;

  static initModel(sequelize: Sequelize) {
    Hold.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        jobId: { type: DataTypes.INTEGER, allowNull: false },
        ncId: { type: DataTypes.INTEGER, allowNull: true },
        reason: { type: DataTypes.TEXT, allowNull: false },
        placedBy: { type: DataTypes.INTEGER, allowNull: true },
        placedAt: { type: DataTypes.DATE },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'active' },
        disposition: { type: DataTypes.TEXT, allowNull: true },
        dispositionComment: { type: DataTypes.TEXT, allowNull: true },
        closedAt: { type: DataTypes.DATE, allowNull: true },
        closedBy: { type: DataTypes.INTEGER, allowNull: true },
        signature: { type: DataTypes.JSONB, allowNull: true },
      },
      { sequelize, tableName: 'holds' },
    );
  }
}
