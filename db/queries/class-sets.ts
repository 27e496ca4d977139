import 'server-only';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { conflict, notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet, MarkClass } from '@/lib/class-sets/schema';
import type { Row } from '@/db/row';

export type StoredClassSet = ClassSet & { id: number; isDefault: boolean; revision: number; reads: number };

const toSet = (r: Row): StoredClassSet => ({
  id: r.id,
  name: r.name,
  isDefault: !!r.is_default,
  revision: r.revision,
  classes: (typeof r.classes === 'string' ? JSON.parse(r.classes) : r.classes) as MarkClass[],
  reads: Number(r.read_count ?? 0),
});

export async function listClassSets(): Promise<StoredClassSet[]> {
  // `reads` is a reserved word in MariaDB: the table is quoted, and the count gets an alias that is not.
  const rows = await db('class_sets as c').select('c.*', db.raw('(select count(*) from `reads` r where r.class_set_id = c.id) as read_count')).orderBy('c.name');
  return rows.map(toSet);
}

export async function createClassSet(actor: CurrentUser, set: ClassSet): Promise<StoredClassSet> {
  return db.transaction(async (trx) => {
    if (await trx('class_sets').where({ name: set.name }).first()) throw conflict(`A class set called “${set.name}” already exists.`);
    const [id] = await trx('class_sets').insert({ name: set.name, classes: JSON.stringify(set.classes), is_default: false, updated_by: actor.id });
    await writeAudit(trx, { userId: actor.id, action: 'create', entity: 'class_set', entityId: id, after: set });
    return toSet(await trx('class_sets').where({ id }).first());
  });
}

/** Edits apply to reads started afterwards; every read keeps the snapshot it started with. */
export async function updateClassSet(actor: CurrentUser, id: number, set: ClassSet & { isDefault?: boolean }): Promise<StoredClassSet> {
  return db.transaction(async (trx) => {
    const before = await trx('class_sets').where({ id }).forUpdate().first();
    if (!before) throw notFound('The class set');
    if (set.name !== before.name && (await trx('class_sets').where({ name: set.name }).whereNot({ id }).first())) throw conflict(`A class set called “${set.name}” already exists.`);
    if (set.isDefault) await trx('class_sets').whereNot({ id }).update({ is_default: false });
    if (set.isDefault === false && before.is_default) throw conflict('Make another set the default instead; the lab always needs one.');
    await trx('class_sets').where({ id }).update({ name: set.name, classes: JSON.stringify(set.classes), is_default: set.isDefault ?? before.is_default, revision: before.revision + 1, updated_by: actor.id, updated_at: trx.fn.now(3) });
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'class_set', entityId: id, before: toSet(before), after: set });
    return toSet(await trx('class_sets').where({ id }).first());
  });
}
