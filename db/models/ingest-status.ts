import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One ingest worker's heartbeat: last commit, lag, buffer and journal sizes, running counts. */
export class IngestStatus extends Model<InferAttributes<IngestStatus>, InferCreationAttributes<IngestStatus>> {
  declare workerId: string;
  declare heartbeatAt: Date;
  declare lastCommitAt: Date | null;
  declare lagMs: number | null;
  declare buffered: CreationOptional<number>;
  declare journalBytes: CreationOptional<number>;
  declare committed: CreationOptional<number>;
  declare rejected: CreationOptional<number>;

  static initModel(sequelize: Sequelize) {
    IngestStatus.init(
      {
        workerId: { type: DataTypes.TEXT, primaryKey: true },
        heartbeatAt: { type: DataTypes.DATE, allowNull: false },
        lastCommitAt: { type: DataTypes.DATE, allowNull: true },
        lagMs: { type: DataTypes.DOUBLE, allowNull: true },
        buffered: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        journalBytes: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0 },
        committed: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0 },
        rejected: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0 },
      },
      { sequelize, tableName: 'ingest_status' },
    );
  }
}
