import type { Knex } from 'knex';

/**
 * Case-insensitive "contains" over several columns (the columns' own utf8mb4 collation);
 * % and _ typed by the user are matched literally.
 */
export function whereContains(b: Knex.QueryBuilder, columns: string[], text: string): Knex.QueryBuilder {
  const pattern = `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  return b.where((w) => {
    for (const c of columns) w.orWhere(c, 'like', pattern);
  });
}
