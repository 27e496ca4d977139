import knexFactory from 'knex';
import { afterAll, describe, expect, it } from 'vitest';
import { knexConfig } from '@/knexfile';
import { closeTestDb, testDb } from '../support/db';

afterAll(closeTestDb);

// The app's own database account (DB_USER, what testDb() and the app connect as).
const refused = async (sql: string) => {
  const err = await testDb().raw(sql).then(() => null, (e: { code?: string }) => e);
  return err?.code ?? 'allowed';
};
const DENIED = /^ER_(TABLEACCESS_DENIED_ERROR|DBACCESS_DENIED_ERROR|SPECIFIC_ACCESS_DENIED_ERROR|ACCESS_DENIED_ERROR)$/;

describe('the app account', () => {
  it('reads and writes rows', async () => {
    const trx = await testDb().transaction();
    try {
      await trx('lab_settings').insert({ key: 'grants-check', value: JSON.stringify(1) });
      expect(await trx('lab_settings').where({ key: 'grants-check' }).update({ value: JSON.stringify(2) })).toBe(1);
      expect(await trx('lab_settings').where({ key: 'grants-check' }).delete()).toBe(1);
    } finally {
      await trx.rollback();
    }
  });

  // Each statement below would fail harmlessly even with the privilege (a duplicate column, a table
  // that exists or does not, a row that is not there, a value set to itself), so a failing run never
  // changes the schema or the audit trail: only the error code tells whether the grant is missing.
  it('adds to the audit log but can neither change nor remove a row of it', async () => {
    const [id] = await testDb()('audit_log').insert({ user_id: null, action: 'grants_check', entity: 'test' });
    expect(await refused(`UPDATE audit_log SET action = action WHERE id = ${Number(id)}`)).toMatch(DENIED);
    expect(await refused('DELETE FROM audit_log WHERE id = -1')).toMatch(DENIED);
    expect((await testDb()('audit_log').where({ id }).first()).action).toBe('grants_check');
  });

  it('cannot alter, drop or create tables', async () => {
    expect(await refused('ALTER TABLE users ADD COLUMN email INT')).toMatch(DENIED);
    expect(await refused('ALTER TABLE audit_log DROP INDEX no_such_index')).toMatch(DENIED);
    expect(await refused('DROP TABLE no_such_table_for_grants_check')).toMatch(DENIED);
    expect(await refused('CREATE TABLE users (id INT)')).toMatch(DENIED);
  });

  it('is not the owner, which migrations use', async () => {
    const owner = knexFactory(knexConfig(undefined, 'owner'));
    try {
      const [[app]] = await testDb().raw('SELECT CURRENT_USER() AS u');
      const [[own]] = await owner.raw('SELECT CURRENT_USER() AS u');
      expect(app.u.split('@')[0]).toBe(process.env.DB_USER);
      expect(own.u.split('@')[0]).toBe(process.env.DB_OWNER_USER);
      expect(app.u).not.toBe(own.u);
    } finally {
      await owner.destroy();
    }
  });
});
