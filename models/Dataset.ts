import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type ModelStatic, type Sequelize } from 'sequelize';
import { numberWithinWorkspace } from './workspace-number';

/** Per-column facts found at upload, plus the analyst's display settings. */
export interface DatasetColumn {
  name: string;
  kind: 'numeric' | 'text';
  count: number;
  /** Rows with no usable number here (empty, a missing marker, or not a number). */
  missing: number;
  /** Of `missing`, the cells that held text that is not a number (typos, not blanks). */
  invalid?: number;
  invalidExamples?: string[];
  min: number | null;
  max: number | null;
  mean: number | null;
  std: number | null;
  displayName?: string;
  unit?: string;
  inputMin?: number | null;
  inputMax?: number | null;
}

export class Dataset extends Model<InferAttributes<Dataset>, InferCreationAttributes<Dataset>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  /** Its number within the workspace (1, 2, …), set on insert; shown to people, while addresses use the id. */
  declare number: CreationOptional<number>;
  declare createdById: ForeignKey<number | null>;
  declare name: string;
  declare originalFilename: string;
  /** The uploaded bytes as received, kept so a re-parse is always possible. */
  declare originalCsv: Buffer;
  declare columns: DatasetColumn[];
  /** Parsed table: row-major cells (numbers or null for missing/non-numeric). */
  declare cells: (number | string | null)[][];
  declare rowCount: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Dataset.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        number: { type: DataTypes.INTEGER, allowNull: true },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        name: { type: DataTypes.STRING(200), allowNull: false },
        originalFilename: { type: DataTypes.STRING(255), allowNull: false },
        originalCsv: { type: DataTypes.BLOB, allowNull: false },
        columns: { type: DataTypes.JSON, allowNull: false },
        cells: { type: DataTypes.JSON, allowNull: false },
        rowCount: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'datasets', modelName: 'Dataset' },
    );
    numberWithinWorkspace(Dataset as unknown as ModelStatic<Model>, 'datasets');
  }
}
