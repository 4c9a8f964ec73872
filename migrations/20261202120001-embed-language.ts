import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Calculators get a language for their fixed texts: 'auto' (the visitor's browser,
 * English when it asks for none of ours) or en, de, fr, es. Existing calculators follow
 * the visitor's browser, which for English-speaking visitors is what they showed before.
 */
export async function up({ context }: { context: MigrationContext }) {
  await context.queryInterface.addColumn('embeds', 'language', { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'auto' });
}

export async function down({ context }: { context: MigrationContext }) {
  await context.sequelize.query('ALTER TABLE embeds DROP COLUMN language');
}
