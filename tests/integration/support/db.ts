import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '@/knexfile';

let instance: Knex | undefined;
export function testDb(): Knex {
  instance ??= knexFactory(knexConfig());
  return instance;
}

export async function closeTestDb() {
  await instance?.destroy();
  instance = undefined;
}

export const unique = (prefix: string) => `${prefix}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 7)}`;
