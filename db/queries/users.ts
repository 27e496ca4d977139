import 'server-only';
import bcrypt from 'bcryptjs';
import { createHash, randomBytes } from 'node:crypto';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { ApiError, conflict, notFound } from '@/lib/api/errors';
import { PASSWORD_HASH_COST } from '@/lib/auth/password';
import type { CurrentUser } from '@/lib/auth/session';
import type { Role } from '@/lib/auth/roles';
import { env } from '@/lib/env';
import { sendMail } from '@/lib/mail/send';

export type UserRow = { id: number; email: string; name: string; role: Role; active: boolean; invited: boolean; clientId: number | null; createdAt: string };

const INVITATION_DAYS = 7;
const RESET_HOURS = 24;
const hashToken = (t: string) => createHash('sha256').update(t).digest('hex');

export type LinkPurpose = 'invitation' | 'password_reset';

function toUser(r: Record<string, unknown>): UserRow {
  return {
    id: Number(r.id),
    email: String(r.email),
    name: String(r.name),
    role: r.role as Role,
    active: Boolean(r.active),
    invited: r.password_hash == null,
    clientId: r.client_id == null ? null : Number(r.client_id),
    createdAt: new Date(r.created_at as string).toISOString(),
  };
}

export async function listUsers(): Promise<UserRow[]> {
  const rows = await db('users').select('*').orderBy('name');
  return rows.map(toUser);
}

export async function inviteUser(
  actor: CurrentUser,
  input: { email: string; name: string; role: Role; clientId?: number },
): Promise<{ user: UserRow; link: string }> {
  const email = input.email.toLowerCase();
  const token = randomBytes(32).toString('base64url');
  const link = `${env().APP_URL}/invite/${token}`;
  const user = await db.transaction(async (trx) => {
    if (await trx('users').where({ email }).first()) throw conflict(`A user with the e-mail ${email} already exists.`);
    if (input.role === 'client') {
      if (!input.clientId) throw new ApiError(422, 'invalid_input', 'A client account must be linked to a client record.', [{ path: 'clientId', message: 'Choose the client this account belongs to.' }]);
      if (!(await trx('clients').where({ id: input.clientId }).first())) throw notFound('The client record');
    }
    const [id] = await trx('users').insert({ email, name: input.name, role: input.role, active: true, password_hash: null, client_id: input.role === 'client' ? input.clientId : null });
    await trx('invitations').insert({ user_id: id, token_hash: hashToken(token), expires_at: new Date(Date.now() + INVITATION_DAYS * 864e5), created_by: actor.id });
    const row = await trx('users').where({ id }).first();
    await writeAudit(trx, { userId: actor.id, action: 'invite', entity: 'user', entityId: id, after: { email, name: input.name, role: input.role } });
    // Sent inside the transaction: if the mail relay refuses, no half-made account is left.
    await sendMail({
      to: email,
      subject: 'Your Fieldmark account',
      text: `Hello ${input.name},\n\n${actor.name} has invited you to Fieldmark as ${input.role.replace('_', ' ')}.\nSet your password with this link (valid ${INVITATION_DAYS} days, usable once):\n\n${link}\n\nIf you did not expect this, ignore this message.`,
    });
    return toUser(row);
  });
  return { user, link };
}

export async function updateUser(actor: CurrentUser, id: number, change: { role?: Role; active?: boolean }): Promise<UserRow> {
  return db.transaction(async (trx) => {
    const before = await trx('users').where({ id }).forUpdate().first();
    if (!before) throw notFound('The user');
    if (id === actor.id && (change.active === false || (change.role && change.role !== 'lab_manager'))) {
      throw conflict('You cannot deactivate yourself or remove your own lab manager role; ask another lab manager.');
    }
    if (change.role && (change.role === 'client') !== (before.role === 'client')) {
      throw conflict('Client accounts and staff accounts are separate: invite a new account instead of changing between client and staff.');
    }
    const patch: Record<string, unknown> = { updated_at: trx.fn.now(3) };
    if (change.role) patch.role = change.role;
    if (change.active !== undefined) patch.active = change.active;
    await trx('users').where({ id }).update(patch);
    const after = await trx('users').where({ id }).first();
    const action = change.active === false ? 'deactivate' : change.active === true ? 'activate' : 'role_change';
    await writeAudit(trx, { userId: actor.id, action, entity: 'user', entityId: id, before: { role: before.role, active: !!before.active }, after: { role: after.role, active: !!after.active } });
    return toUser(after);
  });
}

/**
 * A new one-time link for an account that exists: a password reset for one that has a password,
 * a fresh invitation for one that never set it. Earlier unused links of the account expire, so
 * only the newest one works. The current password keeps working until the new one is set.
 */
export async function sendPasswordLink(actor: CurrentUser, id: number): Promise<{ user: UserRow; purpose: LinkPurpose }> {
  const token = randomBytes(32).toString('base64url');
  const link = `${env().APP_URL}/invite/${token}`;
  return db.transaction(async (trx) => {
    const user = await trx('users').where({ id }).forUpdate().first();
    if (!user) throw notFound('The user');
    if (!user.active) throw conflict(`${user.name}'s account is deactivated: reactivate it first, then send the link.`);
    const purpose: LinkPurpose = user.password_hash ? 'password_reset' : 'invitation';
    const expires = new Date(Date.now() + (purpose === 'password_reset' ? RESET_HOURS * 36e5 : INVITATION_DAYS * 864e5));
    await trx('invitations').where({ user_id: id }).whereNull('used_at').where('expires_at', '>', trx.fn.now(3)).update({ expires_at: trx.fn.now(3) });
    await trx('invitations').insert({ user_id: id, token_hash: hashToken(token), expires_at: expires, created_by: actor.id, purpose });
    await writeAudit(trx, { userId: actor.id, action: purpose === 'password_reset' ? 'password_reset_sent' : 'invite_resent', entity: 'user', entityId: id });
    // Sent inside the transaction: if the relay refuses, the old link is not expired for nothing.
    await sendMail(
      purpose === 'password_reset'
        ? {
            to: user.email,
            subject: 'Set a new Fieldmark password',
            text: `Hello ${user.name},\n\n${actor.name} has sent you a link to set a new password for Fieldmark (valid ${RESET_HOURS} hours, usable once):\n\n${link}\n\nUntil you use it, your current password keeps working. If you did not ask for this, tell your lab manager.`,
          }
        : {
            to: user.email,
            subject: 'Your Fieldmark account',
            text: `Hello ${user.name},\n\n${actor.name} has sent you a new invitation to Fieldmark. Set your password with this link (valid ${INVITATION_DAYS} days, usable once):\n\n${link}\n\nEarlier invitation links no longer work.`,
          },
    );
    return { user: toUser(user), purpose };
  });
}

export async function findInvitation(token: string): Promise<{ name: string; email: string; purpose: LinkPurpose } | null> {
  const row = await db('invitations as i')
    .join('users as u', 'u.id', 'i.user_id')
    .where('i.token_hash', hashToken(token))
    .whereNull('i.used_at')
    .where('i.expires_at', '>', new Date())
    .where('u.active', true)
    .first('u.name', 'u.email', 'i.purpose');
  return row ?? null;
}

export async function acceptInvitation(token: string, password: string): Promise<{ email: string }> {
  const hash = await bcrypt.hash(password, PASSWORD_HASH_COST);
  return db.transaction(async (trx) => {
    const inv = await trx('invitations').where({ token_hash: hashToken(token) }).forUpdate().first();
    if (!inv || inv.used_at || new Date(inv.expires_at) <= new Date()) {
      throw new ApiError(409, 'invitation_invalid', 'This link has expired or was already used. Ask the lab manager for a new one.');
    }
    const user = await trx('users').where({ id: inv.user_id }).first();
    if (!user?.active) throw new ApiError(409, 'invitation_invalid', 'This account has been deactivated.');
    await trx('users').where({ id: user.id }).update({ password_hash: hash, updated_at: trx.fn.now(3) });
    await trx('invitations').where({ id: inv.id }).update({ used_at: trx.fn.now(3) });
    await writeAudit(trx, { userId: user.id, action: inv.purpose === 'password_reset' ? 'password_reset' : 'password_set', entity: 'user', entityId: user.id });
    return { email: user.email };
  });
}
