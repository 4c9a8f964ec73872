import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Payment-service events already applied, so a duplicate or replay changes nothing. */
export class WebhookEvent extends Model<InferAttributes<WebhookEvent>, InferCreationAttributes<WebhookEvent>> {
  declare id: CreationOptional<number>;
  declare eventRef: string;
  declare type: string;
  declare processedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    WebhookEvent.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        eventRef: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        type: { type: DataTypes.STRING(64), allowNull: false },
        processedAt: { type: DataTypes.DATE, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'webhook_events', modelName: 'WebhookEvent' },
    );
  }
}
