import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const WORKSPACE_ROLES = ['owner', 'member'] as const;
export type WorkspaceRole = (typeof WORKSPACE_ROLES)[number];

export class Membership extends Model<InferAttributes<Membership>, InferCreationAttributes<Membership>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<number>;
  declare workspaceId: ForeignKey<number>;
  declare role: WorkspaceRole;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Membership.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        role: { type: DataTypes.STRING(16), allowNull: false, validate: { isIn: [WORKSPACE_ROLES as unknown as string[]] } },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'memberships', modelName: 'Membership' },
    );
  }
}
