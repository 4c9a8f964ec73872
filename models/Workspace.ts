import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Workspace extends Model<InferAttributes<Workspace>, InferCreationAttributes<Workspace>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare slug: string;
  /** Set by staff to silence every calculator of the workspace at once. */
  declare suspendedAt: CreationOptional<Date | null>;
  declare suspendedReason: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Workspace.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        slug: { type: DataTypes.STRING(80), allowNull: false, unique: true },
        suspendedAt: { type: DataTypes.DATE, allowNull: true },
        suspendedReason: { type: DataTypes.TEXT, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'workspaces', modelName: 'Workspace' },
    );
  }
}
