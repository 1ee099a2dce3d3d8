import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A signed record per US 21 CFR Part 11 §11.50: printed name, date-time, meaning. */
export interface SignatureRecord {
  userId: number;
  username: string;
  displayName: string;
  meaning: string;
  signedAt: string;
}

/** One row of the append-only audit trail (the database refuses UPDATE and DELETE). */
export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: CreationOptional<number>;
  declare at: CreationOptional<Date>;
  declare actorId: number | null;
  declare actorLabel: string;
  declare action: string;
  declare entity: string;
  declare entityId: string | null;
  declare before: unknown;
  declare after: unknown;
  declare address: string | null;
  declare signature: SignatureRecord | null;

  static initModel(sequelize: Sequelize) {
    AuditEntry.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        at: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
        actorId: { type: DataTypes.INTEGER, allowNull: true },
        actorLabel: { type: DataTypes.TEXT, allowNull: false },
        action: { type: DataTypes.TEXT, allowNull: false },
        entity: { type: DataTypes.TEXT, allowNull: false },
        entityId: { type: DataTypes.TEXT, allowNull: true },
        before: { type: DataTypes.JSONB, allowNull: true },
        after: { type: DataTypes.JSONB, allowNull: true },
        address: { type: DataTypes.TEXT, allowNull: true },
        signature: { type: DataTypes.JSONB, allowNull: true },
      },
      { sequelize, tableName: 'audit_log' },
    );
  }
}
