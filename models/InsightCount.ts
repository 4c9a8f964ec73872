import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/**
 * What one answer counter of answer insight counts (lib/insight/counters.ts):
 * answers, unusual (flagged unlike the data), with_blanks (answers with a blank field),
 * group (best group `bin`), bin (field `field` fell in bin `bin`), blank (field `field` left blank).
 */
export const INSIGHT_KINDS = ['answers', 'unusual', 'with_blanks', 'group', 'bin', 'blank'] as const;
export type InsightKind = (typeof INSIGHT_KINDS)[number];

/**
 * One daily counter of one calculator version: unique on (embed, version, UTC day, kind,
 * field, bin), added to by the usage flush with `count = count + excluded.count`. Holds a
 * count only: no visitor value, no address, no time finer than the day.
 */
export class InsightCount extends Model<InferAttributes<InsightCount>, InferCreationAttributes<InsightCount>> {
  declare id: CreationOptional<number>;
  declare embedId: ForeignKey<number>;
  declare versionId: ForeignKey<number>;
  /** UTC day, YYYY-MM-DD */
  declare day: string;
  declare kind: InsightKind;
  /** the feature for kinds bin and blank, else '' */
  declare field: CreationOptional<string>;
  /** the bin for kind bin, the group index for kind group, else -1 */
  declare bin: CreationOptional<number>;
  declare count: CreationOptional<number>;
  /** Seeded demo aggregates (lib/demo/insight.ts), not answers. */
  declare demo: CreationOptional<boolean>;

  static initModel(sequelize: Sequelize) {
    InsightCount.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        embedId: { type: DataTypes.INTEGER, allowNull: false },
        versionId: { type: DataTypes.INTEGER, allowNull: false },
        day: { type: DataTypes.STRING(10), allowNull: false },
        kind: { type: DataTypes.STRING(12), allowNull: false },
        field: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
        bin: { type: DataTypes.INTEGER, allowNull: false, defaultValue: -1 },
        count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        demo: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      },
      { sequelize, tableName: 'insight_counts', modelName: 'InsightCount', timestamps: false },
    );
  }
}
