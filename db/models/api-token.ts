import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { RoleName } from './user.ts';

/** A machine client's bearer token; only its SHA-256 is stored. */
export class ApiToken extends Model<InferAttributes<ApiToken>, InferCreationAttributes<ApiToken>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare role: RoleName;
  declare tokenHash: string;
  declare prefix: string;
  declare createdBy: number;
  declare createdAt: CreationOptional<Date>;
  declare lastUsedAt: Date | null;
  declare revokedAt: Date | null;
  /** After this the token answers 401 (default 90 days, at most 365). */
  declare expiresAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ApiToken.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.TEXT, allowNull: false },
        role: { type: DataTypes.TEXT, allowNull: false },
        tokenHash: { type: DataTypes.TEXT, allowNull: false, unique: true },
        prefix: { type: DataTypes.TEXT, allowNull: false },
        createdBy: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
        lastUsedAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'api_tokens' },
    );
  }
}
