import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/**
 * Scored answers per embed per bucket. `period` is a month (`2026-12`) for billing
 * or an hour (`2026-12-01T22`) for spike detection; `granularity` says which.
 */
export class UsageCounter extends Model<InferAttributes<UsageCounter>, InferCreationAttributes<UsageCounter>> {
  declare id: CreationOptional<number>;
  declare embedId: ForeignKey<number>;
  declare workspaceId: ForeignKey<number>;
  declare granularity: 'month' | 'hour';
  declare period: string;
  declare count: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    UsageCounter.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        embedId: { type: DataTypes.INTEGER, allowNull: false },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        granularity: { type: DataTypes.STRING(8), allowNull: false },
        period: { type: DataTypes.STRING(16), allowNull: false },
        count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'usage_counters', modelName: 'UsageCounter' },
    );
  }
}
