import 'server-only';
import { db } from '@/db/knex';
import { whereContains } from '@/db/queries/search';
import { writeAudit } from '@/db/queries/audit';
import { notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClientValues } from '@/lib/validations/client';
import type { Page } from '@/lib/validations/fields';
import type { Row } from '@/db/row';

export type Client = { id: number; name: string; kind: 'owner' | 'referring_vet'; email: string | null; phone: string | null; address: string | null; notes: string | null; stallions: number };

const toClient = (r: Row): Client => ({
  id: r.id, name: r.name, kind: r.kind, email: r.email, phone: r.phone, address: r.address, notes: r.notes, stallions: Number(r.stallions ?? 0),
});
const toRow = (v: ClientValues) => ({ name: v.name, kind: v.kind, email: v.email ?? null, phone: v.phone ?? null, address: v.address ?? null, notes: v.notes ?? null });

const SORT_COLUMNS = { name: 'c.name', kind: 'c.kind', email: 'c.email', stallions: 'stallions' } as const;

export async function listClients(q: { page: number; pageSize: number; sort: keyof typeof SORT_COLUMNS; dir: 'asc' | 'desc'; q?: string }): Promise<Page<Client>> {
  const base = db('clients as c').modify((b) => {
    if (q.q) whereContains(b, ['c.name', 'c.email'], q.q);
  });
  const [{ n }] = await base.clone().count({ n: '*' });
  const rows = await base
    .clone()
    .select('c.*', db.raw('(select count(*) from stallions s where s.client_id = c.id) as stallions'))
    .orderBy(SORT_COLUMNS[q.sort], q.dir)
    .orderBy('c.id', 'asc')
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  return { rows: rows.map(toClient), total: Number(n), page: q.page, pageSize: q.pageSize };
}

export async function getClient(id: number): Promise<Client> {
  const r = await db('clients as c').where('c.id', id).first('c.*', db.raw('(select count(*) from stallions s where s.client_id = c.id) as stallions'));
  if (!r) throw notFound('The client');
  return toClient(r);
}

export async function createClient(actor: CurrentUser, v: ClientValues): Promise<Client> {
  const id = await db.transaction(async (trx) => {
    const [id] = await trx('clients').insert(toRow(v));
    await writeAudit(trx, { userId: actor.id, action: 'create', entity: 'client', entityId: id, after: toRow(v) });
    return id;
  });
  return getClient(id);
}

export async function updateClient(actor: CurrentUser, id: number, v: ClientValues): Promise<Client> {
  await db.transaction(async (trx) => {
    const before = await trx('clients').where({ id }).forUpdate().first();
    if (!before) throw notFound('The client');
    await trx('clients').where({ id }).update({ ...toRow(v), updated_at: trx.fn.now(3) });
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'client', entityId: id, before: toRow(before as ClientValues), after: toRow(v) });
  });
  return getClient(id);
}

export async function clientOptions(): Promise<{ id: number; name: string }[]> {
  return db('clients').select('id', 'name').orderBy('name');
}
