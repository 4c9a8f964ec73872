import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

import type { ApiKeyScope } from './api-key-scopes';

export { API_KEY_SCOPES, type ApiKeyScope } from './api-key-scopes';

/**
 * A workspace's key for the REST API (/api/v1). The whole key is shown once when it is
 * made; only its public prefix (for lists and lookup) and the SHA-256 of the whole key
 * are stored (lib/auth/api-keys.ts).
 */
export class ApiKey extends Model<InferAttributes<ApiKey>, InferCreationAttributes<ApiKey>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  declare name: string;
  /** The public part of the key (`pwk_<prefix>_…`), unique; shown in lists. */
  declare prefix: string;
  /** SHA-256 (hex) of the whole key as sent. */
  declare secretHash: string;
  declare scopes: ApiKeyScope[];
  declare expiresAt: CreationOptional<Date | null>;
  declare lastUsedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdById: ForeignKey<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ApiKey.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        prefix: { type: DataTypes.STRING(16), allowNull: false, unique: true },
        secretHash: { type: DataTypes.STRING(64), allowNull: false },
        scopes: { type: DataTypes.JSON, allowNull: false },
        expiresAt: { type: DataTypes.DATE, allowNull: true },
        lastUsedAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'api_keys', modelName: 'ApiKey' },
    );
  }
}
