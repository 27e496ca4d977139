import 'server-only';
import type { Knex } from 'knex';

export type AuditEntry = {
  userId: number | null;
  action: 'create' | 'update' | 'delete' | 'sign_in' | 'invite' | 'role_change' | 'deactivate' | 'activate' | 'password_set' | 'settings' | string;
  entity: string;
  entityId?: string | number | null;
  before?: unknown;
  after?: unknown;
  reason?: string | null;
};

/** Write one audit row inside the caller's transaction, so the change and its record land together. */
export async function writeAudit(trx: Knex | Knex.Transaction, e: AuditEntry): Promise<void> {
  await trx('audit_log').insert({
    user_id: e.userId,
    action: e.action,
    entity: e.entity,
    entity_id: e.entityId == null ? null : String(e.entityId),
    before: e.before === undefined ? null : JSON.stringify(e.before),
    after: e.after === undefined ? null : JSON.stringify(e.after),
    reason: e.reason ?? null,
  });
}
