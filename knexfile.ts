import type { Knex } from 'knex';
import { env } from './lib/env';

/**
 * The app connects as DB_USER, which may read and write rows but not alter or drop tables, nor
 * change or remove audit rows; migrations and seeds connect as the schema's owner (scripts/db.ts).
 */
export function knexConfig(database?: string, account: 'app' | 'owner' = 'app'): Knex.Config {
  const e = env();
  return {
    client: 'mysql2',
    connection: {
      host: e.DB_HOST,
      port: e.DB_PORT,
      user: account === 'owner' ? e.DB_OWNER_USER : e.DB_USER,
      password: account === 'owner' ? e.DB_OWNER_PASSWORD : e.DB_PASSWORD,
      database: database ?? e.DB_NAME,
      charset: 'utf8mb4',
      timezone: 'Z',
      // DATE columns (calendar days) stay 'YYYY-MM-DD' strings; no time zone can shift them.
      typeCast: (field: { type: string; string: () => string | null }, next: () => unknown) => (field.type === 'DATE' ? field.string() : next()),
      ssl: e.DB_SSL === '1' ? { rejectUnauthorized: true } : undefined,
      // DECIMAL columns come back as numbers, not strings.
      decimalNumbers: true,
    },
    // Mark saves hold a connection for a short transaction each; many technicians save at once.
    pool: { min: 0, max: e.DB_POOL_MAX },
    migrations: { directory: './db/migrations', extension: 'ts', loadExtensions: ['.ts'] },
    seeds: { directory: './db/seeds', extension: 'ts', loadExtensions: ['.ts'] },
  };
}

// The knex CLI migrates, so it is the owner.
export default knexConfig(undefined, 'owner');
