import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type ModelStatic, type Sequelize } from 'sequelize';
import { numberWithinWorkspace } from './workspace-number';

export const FIT_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type FitStatus = (typeof FIT_STATUSES)[number];

/** A fitting job: parameters in, progress while running, candidates out. */
export class Fit extends Model<InferAttributes<Fit>, InferCreationAttributes<Fit>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  /** Its number within the workspace (1, 2, …), set on insert; shown to people, while addresses use the id. */
  declare number: CreationOptional<number>;
  declare datasetId: ForeignKey<number>;
  declare createdById: ForeignKey<number | null>;
  declare status: CreationOptional<FitStatus>;
  declare params: Record<string, unknown>;
  declare progress: CreationOptional<Record<string, unknown> | null>;
  declare result: CreationOptional<Record<string, unknown> | null>;
  declare error: CreationOptional<string | null>;
  declare cancelRequested: CreationOptional<boolean>;
  /** Which server process runs it, so a restart can tell orphans from live jobs. */
  declare runnerId: CreationOptional<string | null>;
  declare startedAt: CreationOptional<Date | null>;
  /** When it last started or ended a turn in a fitting slot; a workspace's latest orders the fair queue. */
  declare lastTurnAt: CreationOptional<Date | null>;
  /** A paused fit's candidates so far (lib/fitting/jobs.ts FitCheckpoint); null otherwise. */
  declare checkpoint: CreationOptional<Record<string, unknown> | null>;
  declare finishedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Fit.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        number: { type: DataTypes.INTEGER, allowNull: true },
        datasetId: { type: DataTypes.INTEGER, allowNull: false },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'queued' },
        params: { type: DataTypes.JSON, allowNull: false },
        progress: { type: DataTypes.JSON, allowNull: true },
        result: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        cancelRequested: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        runnerId: { type: DataTypes.STRING(64), allowNull: true },
        startedAt: { type: DataTypes.DATE, allowNull: true },
        lastTurnAt: { type: DataTypes.DATE, allowNull: true },
        checkpoint: { type: DataTypes.JSON, allowNull: true },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'fits', modelName: 'Fit' },
    );
    numberWithinWorkspace(Fit as unknown as ModelStatic<Model>, 'fits');
  }
}
