import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Append-only record of a sensitive action: who, when, what, from where. */
export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<number>;
  declare actorUserId: ForeignKey<number | null>;
  declare actorEmail: CreationOptional<string | null>;
  declare workspaceId: ForeignKey<number | null>;
  declare action: string;
  declare targetType: CreationOptional<string | null>;
  declare targetId: CreationOptional<string | null>;
  declare detail: CreationOptional<Record<string, unknown>>;
  declare address: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AuditEvent.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        actorUserId: { type: DataTypes.INTEGER, allowNull: true },
        actorEmail: { type: DataTypes.STRING(320), allowNull: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: true },
        action: { type: DataTypes.STRING(64), allowNull: false },
        targetType: { type: DataTypes.STRING(32), allowNull: true },
        targetId: { type: DataTypes.STRING(64), allowNull: true },
        detail: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        address: { type: DataTypes.STRING(64), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'audit_events', modelName: 'AuditEvent' },
    );
  }
}
