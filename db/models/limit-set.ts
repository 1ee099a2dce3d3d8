import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * One version of a characteristic's control limits: drafted from a Phase I study, approved
 * with an electronic signature (then in force from `effectiveFrom`), superseded by the next
 * approval but kept, never recomputed.
 */
export class LimitSet extends Model<InferAttributes<LimitSet>, InferCreationAttributes<LimitSet>> {
  declare id: CreationOptional<number>;
  declare characteristicId: number;
  declare version: number;
  declare status: string;
  declare chart: string;
  declare center: number;
  declare ucl: number;
  declare lcl: number;
  declare dispersionCenter: number | null;
  declare dispersionUcl: number | null;
  declare dispersionLcl: number | null;
  declare sigma: number | null;
  declare n: number;
  declare params: CreationOptional<object>;
  declare baselineFrom: Date;
  declare baselineTo: Date;
  declare baselineFirstIndex: number | null;
  declare baselineLastIndex: number | null;
  declare baselinePoints: number;
  declare excluded: CreationOptional<object>;
  declare suggested: CreationOptional<object>;
  declare capability: unknown;
  declare note: CreationOptional<string>;
  declare effectiveFrom: Date | null;
  declare approvedSignature: unknown;
  declare approvedAt: Date | null;
  declare seeded: CreationOptional<boolean>;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LimitSet.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        characteristicId: { type: DataTypes.INTEGER, allowNull: false },
        version: { type: DataTypes.INTEGER, allowNull: false },
        status: { type: DataTypes.TEXT, allowNull: false },
        chart: { type: DataTypes.TEXT, allowNull: false },
        center: { type: DataTypes.DOUBLE, allowNull: false },
        ucl: { type: DataTypes.DOUBLE, allowNull: false },
        lcl: { type: DataTypes.DOUBLE, allowNull: false },
        dispersionCenter: { type: DataTypes.DOUBLE, allowNull: true },
        dispersionUcl: { type: DataTypes.DOUBLE, allowNull: true },
        dispersionLcl: { type: DataTypes.DOUBLE, allowNull: true },
        sigma: { type: DataTypes.DOUBLE, allowNull: true },
        n: { type: DataTypes.DOUBLE, allowNull: false },
        params: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        baselineFrom: { type: DataTypes.DATE, allowNull: false },
        baselineTo: { type: DataTypes.DATE, allowNull: false },
        baselineFirstIndex: { type: DataTypes.INTEGER, allowNull: true },
        baselineLastIndex: { type: DataTypes.INTEGER, allowNull: true },
        baselinePoints: { type: DataTypes.INTEGER, allowNull: false },
        excluded: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        suggested: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        capability: { type: DataTypes.JSONB, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        effectiveFrom: { type: DataTypes.DATE, allowNull: true },
        approvedSignature: { type: DataTypes.JSONB, allowNull: true },
        approvedAt: { type: DataTypes.DATE, allowNull: true },
        seeded: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdBy: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'limit_sets' },
    );
  }
}
