import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** What the analyst says about one cluster. */
export interface ClusterLabel {
  label: string;
  description: string;
  color: string;
}

/** How the calculator asks for one feature. */
export interface FieldSetting {
  feature: string;
  label: string;
  unit: string;
  min: number;
  max: number;
  help: string;
  /** May the visitor leave it blank (answered from the other fields' marginal)? Absent = false: required. */
  optional?: boolean;
}

/** A chosen, named candidate from a fit; editable until published as a version. */
export class MixtureModel extends Model<InferAttributes<MixtureModel>, InferCreationAttributes<MixtureModel>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  declare fitId: ForeignKey<number | null>;
  declare datasetId: ForeignKey<number | null>;
  declare createdById: ForeignKey<number | null>;
  declare name: string;
  /** The engine's versioned model JSON (see lib/mixture/README.md). */
  declare model: Record<string, unknown>;
  declare clusters: ClusterLabel[];
  declare fields: FieldSetting[];
  declare caution: CreationOptional<string>;
  /** Why the analyst picked this candidate when it is not the BIC winner. */
  declare selectionNote: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    MixtureModel.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        fitId: { type: DataTypes.INTEGER, allowNull: true },
        datasetId: { type: DataTypes.INTEGER, allowNull: true },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        name: { type: DataTypes.STRING(200), allowNull: false },
        model: { type: DataTypes.JSON, allowNull: false },
        clusters: { type: DataTypes.JSON, allowNull: false },
        fields: { type: DataTypes.JSON, allowNull: false },
        caution: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        selectionNote: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'mixture_models', modelName: 'MixtureModel' },
    );
  }
}
