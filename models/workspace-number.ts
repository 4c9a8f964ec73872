import { QueryTypes, type CreateOptions, type Model, type ModelStatic } from 'sequelize';
import { lockWorkspace } from './db';

/**
 * Rows numbered within their workspace (datasets, fits): "Fit 1" is a workspace's own
 * first fit. The INSERT itself takes the next number (a subquery in its VALUES), so the
 * number is assigned in the same statement, and so the same transaction, as the row:
 * on SQLite, whose writers take turns, two inserts can never read the same maximum, and
 * no caller needs a transaction of its own. The unique (workspace_id, number) index
 * backs this up.
 *
 * PostgreSQL runs concurrent INSERTs side by side, and two could read the same maximum:
 * there the insert first takes the workspace's row lock (lockWorkspace), and a create
 * without a transaction gets one of its own so the lock lasts until the row is in.
 */
export function numberWithinWorkspace(model: ModelStatic<Model>, table: string): void {
  const sequelize = () => model.sequelize!;
  model.addHook('beforeCreate', async (row: Model, options: CreateOptions) => {
    if (row.get('number')) return;
    const workspaceId = Number(row.get('workspaceId'));
    if (!Number.isInteger(workspaceId)) return;
    await lockWorkspace(workspaceId, options.transaction);
    row.set('number', sequelize().literal(`(SELECT COALESCE(MAX(number), 0) + 1 FROM ${table} WHERE workspace_id = ${workspaceId})`) as never);
  });
  // The instance holds the SQL it was given; read back the number it became.
  model.addHook('afterCreate', async (row: Model, options: CreateOptions) => {
    if (typeof row.get('number') === 'number') return;
    const [stored] = await sequelize().query<{ number: number }>(`SELECT number FROM ${table} WHERE id = ?`, { replacements: [row.get('id')], type: QueryTypes.SELECT, transaction: options.transaction ?? null });
    row.setDataValue('number' as never, stored?.number as never);
    row.changed('number' as never, false);
  });
  const create = model.create.bind(model) as (values?: unknown, options?: CreateOptions) => Promise<Model>;
  (model as unknown as { create: typeof create }).create = (values, options) => {
    if (options?.transaction || sequelize().getDialect() !== 'postgres') return create(values, options);
    return sequelize().transaction((transaction) => create(values, { ...options, transaction }));
  };
}
