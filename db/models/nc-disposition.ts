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

/** A signed disposition of held jobs under a nonconformance. */
export class NcDisposition extends Model<InferAttributes<NcDisposition>, InferCreationAttributes<NcDisposition>> {
  declare id: CreationOptional<number>;
  declare ncId: number;
  declare disposition: Disposition;
  declare jobIds: number[];
  declare comment: string;
  declare signature: SignatureRecord;
  declare at: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    NcDisposition.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        ncId: { type: DataTypes.INTEGER, allowNull: false },
        disposition: { type: DataTypes.TEXT, allowNull: false },
        jobIds: { type: DataTypes.ARRAY(DataTypes.INTEGER), allowNull: false },
        comment: { type: DataTypes.TEXT, allowNull: false },
        signature: { type: DataTypes.JSONB, allowNull: false },
        at: { type: DataTypes.DATE },
      },
      { sequelize, tableName: 'nc_dispositions' },
    );
  }
}
