import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/**
 * An immutable published snapshot: model JSON, cluster labels, field settings and
 * caution text as they were at publish time. Never updated after creation.
 */
export class ModelVersion extends Model<InferAttributes<ModelVersion>, InferCreationAttributes<ModelVersion>> {
  declare id: CreationOptional<number>;
  declare embedId: ForeignKey<number>;
  declare mixtureModelId: ForeignKey<number | null>;
  declare createdById: ForeignKey<number | null>;
  declare number: number;
  declare payload: Record<string, unknown>;
  /** SHA-256 of the canonical payload, to detect a corrupted row. */
  declare checksum: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ModelVersion.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        embedId: { type: DataTypes.INTEGER, allowNull: false },
        mixtureModelId: { type: DataTypes.INTEGER, allowNull: true },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        number: { type: DataTypes.INTEGER, allowNull: false },
        payload: { type: DataTypes.JSON, allowNull: false },
        checksum: { type: DataTypes.STRING(64), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'model_versions', modelName: 'ModelVersion' },
    );
  }
}
