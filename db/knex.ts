import 'server-only';
import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '@/knexfile';

// One pool per process, kept across hot reloads in development.
const globalForKnex = globalThis as unknown as { fieldmarkKnex?: Knex };

export const db: Knex = globalForKnex.fieldmarkKnex ?? knexFactory(knexConfig());
globalForKnex.fieldmarkKnex = db;
