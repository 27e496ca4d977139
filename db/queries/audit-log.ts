import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import type { Row } from '@/db/row';
import { getLabSettings } from '@/db/queries/settings';
import { forbidden } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import { labDay, wallTimeToDate } from '@/lib/time/lab-time';
import type { AuditQuery } from '@/lib/validations/audit';

// Reading the audit log (the lab manager's audit page); writing it is db/queries/audit.ts.

export type AuditRow = {
  id: number;
  at: string;
  userId: number | null;
  userName: string | null;
  action: string;
  entity: string;
  entityId: string | null;
  before: unknown;
  after: unknown;
  reason: string | null;
};

const parseJson = (v: unknown) => {
  if (typeof v !== 'string') return v ?? null;
  try {
    return JSON.parse(v);
  } catch {
    return v;
  }
};

/**
 * The audit log for the lab manager, newest first, one page: filtered by person, record type,
 * record and the lab's calendar days (from and to inclusive). Backed by the (entity, entity_id)
 * and created_at indexes.
 */
export async function listAudit(actor: CurrentUser, q: AuditQuery): Promise<{ rows: AuditRow[]; total: number; page: number; pageSize: number }> {
  if (actor.role !== 'lab_manager') throw forbidden('The audit log is for the lab manager.');
  const timeZone = q.from || q.to ? (await getLabSettings()).timeZone : 'UTC';
  // From and to are the lab's calendar days (noon is on that day whatever the clock changes).
  const dayOf = (date: string) => labDay(wallTimeToDate(`${date}T12:00`, timeZone) ?? new Date(`${date}T12:00:00Z`), timeZone);
  const filter = (b: Knex.QueryBuilder) => {
    if (q.userId) b.where('a.user_id', q.userId);
    if (q.entity) b.where('a.entity', q.entity);
    if (q.entityId) b.where('a.entity_id', q.entityId);
    if (q.from) b.where('a.created_at', '>=', dayOf(q.from).start);
    if (q.to) b.where('a.created_at', '<', dayOf(q.to).end);
    // The search box matches the action (sign, amend, update …).
    if (q.q) b.where('a.action', q.q);
    return b;
  };
  const [{ n }] = await filter(db('audit_log as a')).count({ n: '*' });
  const rows = await filter(db('audit_log as a').leftJoin('users as u', 'u.id', 'a.user_id'))
    .orderBy('a.created_at', q.dir)
    .orderBy('a.id', q.dir)
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .select('a.*', 'u.name as user_name');
  return {
    rows: rows.map((r: Row) => ({
      id: Number(r.id),
      at: new Date(r.created_at).toISOString(),
      userId: r.user_id,
      userName: r.user_name ?? null,
      action: r.action,
      entity: r.entity,
      entityId: r.entity_id,
      before: parseJson(r.before),
      after: parseJson(r.after),
      reason: r.reason,
    })),
    total: Number(n),
    page: q.page,
    pageSize: q.pageSize,
  };
}

/** The record types and people the audit log's filters offer. */
export async function auditFilterOptions(actor: CurrentUser): Promise<{ entities: string[]; people: { id: number; name: string }[] }> {
  if (actor.role !== 'lab_manager') throw forbidden('The audit log is for the lab manager.');
  const [entities, people] = await Promise.all([
    db('audit_log').distinct('entity').orderBy('entity').pluck('entity'),
    db('users').orderBy('name').select('id', 'name'),
  ]);
  return { entities, people };
}
