import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A workspace's plan as last confirmed by the payment service's webhooks. */
export class Subscription extends Model<InferAttributes<Subscription>, InferCreationAttributes<Subscription>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  declare plan: string;
  declare status: CreationOptional<string>;
  declare customerRef: CreationOptional<string | null>;
  declare subscriptionRef: CreationOptional<string | null>;
  declare currentPeriodStart: CreationOptional<Date | null>;
  declare currentPeriodEnd: CreationOptional<Date | null>;
  declare cancelAtPeriodEnd: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Subscription.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false, unique: true },
        plan: { type: DataTypes.STRING(32), allowNull: false },
        status: { type: DataTypes.STRING(32), allowNull: false, defaultValue: 'active' },
        customerRef: { type: DataTypes.STRING(64), allowNull: true },
        subscriptionRef: { type: DataTypes.STRING(64), allowNull: true },
        currentPeriodStart: { type: DataTypes.DATE, allowNull: true },
        currentPeriodEnd: { type: DataTypes.DATE, allowNull: true },
        cancelAtPeriodEnd: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'subscriptions', modelName: 'Subscription' },
    );
  }
}
