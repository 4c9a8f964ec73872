import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One field's bins as fixed when its version was published (lib/insight/bins.ts). */
export interface StoredFieldBins {
  feature: string;
  label: string;
  unit: string;
  /** length bins+1; the first and last bins ("below the minimum", "above the maximum") are open-ended, their outer edges nominal */
  edges: number[];
}

/**
 * Answer insight's bins of one published version, fixed at publish time from the fields'
 * input ranges, with the training data's counts on the same bins (from the model's dataset
 * when it was there, else from draws of the fitted model: `source` says which). Never updated.
 */
export class InsightBins extends Model<InferAttributes<InsightBins>, InferCreationAttributes<InsightBins>> {
  declare versionId: ForeignKey<number>;
  declare bins: StoredFieldBins[];
  /** per field (the bins' order), counts per bin */
  declare training: number[][];
  declare source: 'dataset' | 'model-sample';
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    InsightBins.init(
      {
        versionId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
        bins: { type: DataTypes.JSON, allowNull: false },
        training: { type: DataTypes.JSON, allowNull: false },
        source: { type: DataTypes.STRING(16), allowNull: false },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'insight_bins', modelName: 'InsightBins', updatedAt: false },
    );
  }
}
