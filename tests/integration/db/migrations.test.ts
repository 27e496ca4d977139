import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { knexConfig } from '@/knexfile';

// Migrates a scratch database up and down, checking data survives each step up (as the schema's
// owner, like scripts/db.ts: the app account may not create or alter tables).
const NAME = `${process.env.DB_NAME ?? 'fieldmark'}_migrations`;
let admin: Knex;
let db: Knex;

beforeAll(async () => {
  admin = knexFactory(knexConfig(undefined, 'owner'));
  await admin.raw(`DROP DATABASE IF EXISTS \`${NAME}\``);
  await admin.raw(`CREATE DATABASE \`${NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  db = knexFactory(knexConfig(NAME, 'owner'));
});

afterAll(async () => {
  await db?.destroy();
  await admin.raw(`DROP DATABASE IF EXISTS \`${NAME}\``);
  await admin.destroy();
});

describe('migrations', () => {
  it('go up one at a time keeping data, then all the way down, then up again', async () => {
    const all: string[] = (await db.migrate.list())[1].map((m: { file: string }) => m.file);
    expect(all.length).toBeGreaterThanOrEqual(2);
    await db.migrate.up();
    await db('users').insert({ email: 'keep@quillfield.example', name: 'Keep', role: 'technician' });
    while ((await db.migrate.list())[1].length > 0) {
      await db.migrate.up();
      expect(await db('users').where({ email: 'keep@quillfield.example' }).first()).toBeTruthy();
    }
    await db.migrate.rollback(undefined, true);
    const tables = await db.raw('SHOW TABLES');
    const names = (tables[0] as Record<string, string>[]).map((r) => Object.values(r)[0]).filter((n) => !n.startsWith('knex_'));
    expect(names).toEqual([]);
    await db.migrate.latest();
    expect((await db.migrate.list())[1]).toEqual([]);
  });
});
