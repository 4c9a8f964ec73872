import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One line of an invoice as the payment service itemised it. */
export interface InvoiceLine {
  description: string;
  amount: number;
  proration: boolean;
  periodStart: string | null;
  periodEnd: string | null;
}

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
  /** Sum of the lines before credit (cents; negative for a downgrade). */
  declare subtotal: CreationOptional<number | null>;
  /** The customer's balance before and after this invoice; negative = credit. */
  declare startingBalance: CreationOptional<number>;
  declare endingBalance: CreationOptional<number>;
  declare lines: CreationOptional<InvoiceLine[]>;
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
        subtotal: { type: DataTypes.INTEGER, allowNull: true },
        startingBalance: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        endingBalance: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        lines: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'invoices', modelName: 'Invoice' },
    );
  }
}
