import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Invoices keep what their detail page and receipts show: the lines, the subtotal and
 * the customer's balance before and after (negative = credit), so a downgrade's credit
 * is visible instead of a bare "0.00 paid".
 */
export async function up({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.addColumn('invoices', 'subtotal', { type: DataTypes.INTEGER, allowNull: true });
  await q.addColumn('invoices', 'starting_balance', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await q.addColumn('invoices', 'ending_balance', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await q.addColumn('invoices', 'lines', { type: DataTypes.JSON, allowNull: false, defaultValue: '[]' });
}

export async function down({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.removeColumn('invoices', 'lines');
  await q.removeColumn('invoices', 'ending_balance');
  await q.removeColumn('invoices', 'starting_balance');
  await q.removeColumn('invoices', 'subtotal');
}
