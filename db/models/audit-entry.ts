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

/**
 * One row of the append-only audit trail (the database refuses UPDATE and DELETE), hash-chained
 * to the row before it (migration 20261204-1900; checked by src/lib/core/audit-chain.ts).
 */
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
  /** The previous row's `hash` (null for the first row); set by the database's chain trigger. */
  declare prevHash: CreationOptional<Buffer | null>;
  /** SHA-256 of the row's canonical text and `prevHash` (trigger `audit_log_chain`). */
  declare hash: CreationOptional<Buffer | null>;

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
        prevHash: { type: DataTypes.BLOB, allowNull: true },
        hash: { type: DataTypes.BLOB, allowNull: true },
      },
      { sequelize, tableName: 'audit_log' },
    );
  }
}
