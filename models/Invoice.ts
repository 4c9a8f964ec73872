import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Invoice extends Model<InferAttributes<Invoice>, InferCreationAttributes<Invoice>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  declare invoiceRef: string;
  declare number: CreationOptional<string | null>;
  /** Amounts in the smallest currency unit (cents). */
  declare amountDue: number;
  declare amountPaid: CreationOptional<number>;
  declare currency: CreationOptional<string>;
  declare status: string;
  declare periodStart: CreationOptional<Date | null>;
  declare periodEnd: CreationOptional<Date | null>;
  declare paidAt: CreationOptional<Date | null>;
  declare receiptSentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Invoice.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        invoiceRef: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        number: { type: DataTypes.STRING(64), allowNull: true },
        amountDue: { type: DataTypes.INTEGER, allowNull: false },
        amountPaid: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        currency: { type: DataTypes.STRING(3), allowNull: false, defaultValue: 'eur' },
        status: { type: DataTypes.STRING(16), allowNull: false },
        periodStart: { type: DataTypes.DATE, allowNull: true },
        periodEnd: { type: DataTypes.DATE, allowNull: true },
        paidAt: { type: DataTypes.DATE, allowNull: true },
        receiptSentAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'invoices', modelName: 'Invoice' },
    );
  }
}
