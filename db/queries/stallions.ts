import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { whereContains } from '@/db/queries/search';
import { writeAudit } from '@/db/queries/audit';
import { ApiError, conflict, forbidden, notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { Page } from '@/lib/validations/fields';
import type { StallionValues } from '@/lib/validations/stallion';
import type { Row } from '@/db/row';

export type Stallion = {
  id: number; name: string; registration: string | null; breed: string | null; foalingYear: number | null;
  clientId: number; owner: string; notes: string | null; collections: number; lastCollection: string | null;
};

const toStallion = (r: Row): Stallion => ({
  id: r.id, name: r.name, registration: r.registration, breed: r.breed, foalingYear: r.foaling_year, clientId: r.client_id,
  owner: r.owner, notes: r.notes, collections: Number(r.collections ?? 0), lastCollection: r.last_collection ? new Date(r.last_collection).toISOString() : null,
});
const toRow = (v: StallionValues) => ({
  name: v.name, registration: v.registration ?? null, breed: v.breed ?? null, foaling_year: v.foalingYear ?? null, client_id: v.clientId, notes: v.notes ?? null,
});

/** Clients see their own stallions only; staff see all. */
export function visibleStallions(user: CurrentUser, b: Knex.QueryBuilder, column = 's.client_id') {
  if (user.role === 'client') b.where(column, user.clientId ?? -1);
  return b;
}

function selectStallions() {
  return db('stallions as s')
    .join('clients as c', 'c.id', 's.client_id')
    .select(
      's.*',
      'c.name as owner',
      db.raw('(select count(*) from collections k where k.stallion_id = s.id) as collections'),
      db.raw('(select max(k.collected_at) from collections k where k.stallion_id = s.id) as last_collection'),
    );
}

const SORT_COLUMNS = { name: 's.name', breed: 's.breed', foalingYear: 's.foaling_year', owner: 'owner', lastCollection: 'last_collection', collections: 'collections' } as const;

export async function listStallions(
  user: CurrentUser,
  q: { page: number; pageSize: number; sort: keyof typeof SORT_COLUMNS; dir: 'asc' | 'desc'; q?: string; clientId?: number },
): Promise<Page<Stallion>> {
  const filter = (b: Knex.QueryBuilder) => {
    visibleStallions(user, b);
    if (q.clientId) b.where('s.client_id', q.clientId);
    if (q.q) whereContains(b, ['s.name', 's.registration', 's.breed', 'c.name'], q.q);
    return b;
  };
  const [{ n }] = await filter(db('stallions as s').join('clients as c', 'c.id', 's.client_id')).count({ n: '*' });
  const rows = await filter(selectStallions())
    .orderBy(SORT_COLUMNS[q.sort], q.dir)
    .orderBy('s.id', 'asc')
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  return { rows: rows.map(toStallion), total: Number(n), page: q.page, pageSize: q.pageSize };
}

export async function getStallion(user: CurrentUser, id: number): Promise<Stallion> {
  const r = await selectStallions().where('s.id', id).first();
  if (!r) throw notFound('The stallion');
  if (user.role === 'client' && r.client_id !== user.clientId) throw notFound('The stallion');
  return toStallion(r);
}

async function checkRefs(trx: Knex.Transaction, v: StallionValues, id?: number) {
  if (!(await trx('clients').where({ id: v.clientId }).first())) {
    throw new ApiError(422, 'invalid_input', 'The owner was not found.', [{ path: 'clientId', message: 'Choose an existing client as owner.' }]);
  }
  if (v.registration) {
    const dup = await trx('stallions').where({ registration: v.registration }).modify((b) => id && b.whereNot({ id })).first();
    if (dup) throw conflict(`Another stallion (${dup.name}) already has the registration ${v.registration}.`);
  }
}

export async function createStallion(actor: CurrentUser, v: StallionValues): Promise<Stallion> {
  if (actor.role === 'client') throw forbidden();
  const id = await db.transaction(async (trx) => {
    await checkRefs(trx, v);
    const [id] = await trx('stallions').insert(toRow(v));
    await writeAudit(trx, { userId: actor.id, action: 'create', entity: 'stallion', entityId: id, after: toRow(v) });
    return id;
  });
  return getStallion(actor, id);
}

export async function updateStallion(actor: CurrentUser, id: number, v: StallionValues): Promise<Stallion> {
  if (actor.role === 'client') throw forbidden();
  await db.transaction(async (trx) => {
    const before = await trx('stallions').where({ id }).forUpdate().first();
    if (!before) throw notFound('The stallion');
    await checkRefs(trx, v, id);
    await trx('stallions').where({ id }).update({ ...toRow(v), updated_at: trx.fn.now(3) });
    const { created_at, updated_at, id: _id, ...beforeRow } = before;
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'stallion', entityId: id, before: beforeRow, after: toRow(v) });
  });
  return getStallion(actor, id);
}

export async function stallionOptions(): Promise<{ id: number; name: string }[]> {
  return db('stallions').select('id', 'name').orderBy('name');
}

/** The stallions of the client the user speaks for (the portal); none for an account linked to no client. */
export async function ownStallions(user: CurrentUser): Promise<{ id: number; name: string; breed: string | null; registration: string | null }[]> {
  if (user.clientId == null) return [];
  return db('stallions').where({ client_id: user.clientId }).orderBy('name').select('id', 'name', 'breed', 'registration');
}
