import type { Knex } from 'knex';
import { env } from './lib/env';

export function knexConfig(database?: string): Knex.Config {
  const e = env();
  return {
    client: 'mysql2',
    connection: {
      host: e.DB_HOST,
      port: e.DB_PORT,
      user: e.DB_USER,
      password: e.DB_PASSWORD,
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

export default knexConfig();
