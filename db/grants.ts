// The app account's table grants, made by `scripts/db.ts migrate` as the schema's owner after
// every migration (so a new table is covered on the next start). The app may read and write
// rows; it may not alter or drop tables (no database-wide privilege at all), and audit_log is
// append-only by the database's own grants: SELECT and INSERT, never UPDATE or DELETE.
import type { Knex } from 'knex';

/** Tables the app may add to and read, never change or empty. */
export const APPEND_ONLY_TABLES = ['audit_log'];
/** Knex's own bookkeeping: the owner's business only. */
const OWNER_ONLY_TABLES = ['knex_migrations', 'knex_migrations_lock'];

const ROW_PRIVILEGES = 'SELECT, INSERT, UPDATE, DELETE';
const APPEND_PRIVILEGES = 'SELECT, INSERT';
/** MariaDB's "There is no such grant defined …": nothing to revoke. */
const NO_SUCH_GRANT = new Set([1141, 1147]);

const quoteId = (s: string) => `\`${s.replace(/`/g, '``')}\``;

export async function grantAppAccount(knex: Knex, { database, user, hosts }: { database: string; user: string; hosts: string[] }): Promise<number> {
  const [rows] = await knex.raw("SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE'", [database]);
  const tables = (rows as { name: string }[]).map((r) => r.name).filter((t) => !OWNER_ONLY_TABLES.includes(t));
  for (const host of hosts) {
    for (const table of tables) {
      const on = `${quoteId(database)}.${quoteId(table)}`;
      if (APPEND_ONLY_TABLES.includes(table)) {
        // A grant made wider by hand (or by an older checkout) is narrowed again.
        await knex.raw(`REVOKE UPDATE, DELETE ON ${on} FROM ?@?`, [user, host]).catch((err: { errno?: number }) => {
          if (!NO_SUCH_GRANT.has(err.errno ?? 0)) throw err;
        });
        await knex.raw(`GRANT ${APPEND_PRIVILEGES} ON ${on} TO ?@?`, [user, host]);
      } else {
        await knex.raw(`GRANT ${ROW_PRIVILEGES} ON ${on} TO ?@?`, [user, host]);
      }
    }
  }
  return tables.length;
}
