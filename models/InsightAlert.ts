import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One member's weekly insight mail for one calculator: on or off, the thresholds, when it last went out. */
export class InsightAlert extends Model<InferAttributes<InsightAlert>, InferCreationAttributes<InsightAlert>> {
  declare id: CreationOptional<number>;
  declare embedId: ForeignKey<number>;
  declare userId: ForeignKey<number>;
  declare subscribed: CreationOptional<boolean>;
  /** overall drift (largest field PSI over the last 7 days) at or above which the mail goes out */
  declare driftThreshold: number;
  /** share of the last 7 days' answers flagged unusual at or above which the mail goes out */
  declare unusualShare: number;
  declare lastSentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    InsightAlert.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        embedId: { type: DataTypes.INTEGER, allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        subscribed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        driftThreshold: { type: DataTypes.FLOAT, allowNull: false },
        unusualShare: { type: DataTypes.FLOAT, allowNull: false },
        lastSentAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'insight_alerts', modelName: 'InsightAlert' },
    );
  }
}
