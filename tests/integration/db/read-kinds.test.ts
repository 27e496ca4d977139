import { afterAll, describe, expect, it } from 'vitest';
import { READ_KINDS, READ_STATUSES } from '@/lib/reads/kinds';
import { closeTestDb, testDb } from '../support/db';

afterAll(closeTestDb);

/** The values of an enum column as MariaDB holds them. */
async function enumValues(table: string, column: string): Promise<string[]> {
  const row = await testDb()('information_schema.COLUMNS')
    .where({ TABLE_SCHEMA: testDb().raw('database()'), TABLE_NAME: table, COLUMN_NAME: column })
    .first('COLUMN_TYPE as type');
  return [...String(row.type).matchAll(/'([^']*)'/g)].map((m) => m[1]!);
}

describe('read kinds and states', () => {
  // lib/reads/kinds.ts names them once; a landed migration made the columns. A new kind or state
  // needs a migration that widens the enum, and this test says so until it exists.
  it('are the values the database accepts', async () => {
    expect(await enumValues('reads', 'kind')).toEqual([...READ_KINDS]);
    expect(await enumValues('reads', 'status')).toEqual([...READ_STATUSES]);
  });
});
