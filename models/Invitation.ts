import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { WorkspaceRole } from './Membership';

export class Invitation extends Model<InferAttributes<Invitation>, InferCreationAttributes<Invitation>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  declare email: string;
  declare role: WorkspaceRole;
  /** SHA-256 of the token mailed out; the token itself is never stored. */
  declare tokenHash: string;
  declare invitedById: ForeignKey<number>;
  declare expiresAt: Date;
  declare acceptedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Invitation.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        email: { type: DataTypes.STRING(320), allowNull: false },
        role: { type: DataTypes.STRING(16), allowNull: false },
        tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        invitedById: { type: DataTypes.INTEGER, allowNull: false },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        acceptedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'invitations', modelName: 'Invitation' },
    );
  }
}
