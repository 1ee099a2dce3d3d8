import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** The outcome of one walk over the audit hash chain (`npm run audit:verify` or the admin screen). */
export class AuditVerification extends Model<InferAttributes<AuditVerification>, InferCreationAttributes<AuditVerification>> {
  declare id: CreationOptional<number>;
  declare at: CreationOptional<Date>;
  declare actorLabel: string;
  declare ok: boolean;
  declare rowsChecked: number;
  declare lastId: number | null;
  /** The hash of row `lastId` as seen by this run: the next run checks it is still the same. */
  declare lastHash: Buffer | null;
  declare brokenId: number | null;
  declare problem: string | null;

  static initModel(sequelize: Sequelize) {
    AuditVerification.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        at: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
        actorLabel: { type: DataTypes.TEXT, allowNull: false },
        ok: { type: DataTypes.BOOLEAN, allowNull: false },
        rowsChecked: { type: DataTypes.BIGINT, allowNull: false },
        lastId: { type: DataTypes.BIGINT, allowNull: true },
        lastHash: { type: DataTypes.BLOB, allowNull: true },
        brokenId: { type: DataTypes.BIGINT, allowNull: true },
        problem: { type: DataTypes.TEXT, allowNull: true },
      },
      { sequelize, tableName: 'audit_verifications' },
    );
  }
}
