'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { apiFetch, ApiRequestError } from '@/lib/api/fetcher';
import { ROLE_LABELS, ROLES, type Role } from '@/lib/auth/roles';
import { inviteSchema } from '@/lib/validations/auth';

type User = { id: number; email: string; name: string; role: Role; active: boolean; invited: boolean };
type InviteInput = z.input<typeof inviteSchema>;
type InviteOutput = z.output<typeof inviteSchema>;

export function UsersManager({ initialUsers, clients, meId }: { initialUsers: User[]; clients: { id: number; name: string }[]; meId: number }) {
  const [users, setUsers] = useState(initialUsers);
  const [status, setStatus] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const form = useForm<InviteInput, unknown, InviteOutput>({ resolver: zodResolver(inviteSchema), defaultValues: { role: 'technician' } });
  const role = form.watch('role');

  async function invite(values: InviteOutput) {
    setStatus(null);
    try {
      const { user } = await apiFetch<{ user: User }>('/api/users', { method: 'POST', body: JSON.stringify(values) });
      setUsers((u) => [...u, user].sort((a, b) => a.name.localeCompare(b.name)));
      form.reset({ role: values.role, name: '', email: '' });
      setStatus({ kind: 'ok', text: `Invitation sent to ${user.email}.` });
    } catch (err) {
      if (err instanceof ApiRequestError) {
        for (const issue of err.body.issues ?? []) form.setError(issue.path as keyof InviteInput, { message: issue.message });
        setStatus({ kind: 'error', text: err.message });
      } else setStatus({ kind: 'error', text: 'The invitation could not be sent. Check the connection and try again.' });
    }
  }

  async function change(id: number, patch: { role?: Role; active?: boolean }) {
    setStatus(null);
    try {
      const { user } = await apiFetch<{ user: User }>(`/api/users/${id}`, { method: 'PATCH', body: JSON.stringify(patch) });
      setUsers((list) => list.map((u) => (u.id === id ? user : u)));
      setStatus({ kind: 'ok', text: `${user.name} updated.` });
    } catch (err) {
      setStatus({ kind: 'error', text: err instanceof Error ? err.message : 'The change failed.' });
    }
  }

  async function sendLink(u: User) {
    setStatus(null);
    try {
      const { purpose } = await apiFetch<{ purpose: 'invitation' | 'password_reset' }>(`/api/users/${u.id}/password-link`, { method: 'POST' });
      setStatus({ kind: 'ok', text: purpose === 'password_reset' ? `A link to set a new password was sent to ${u.email}.` : `A new invitation was sent to ${u.email}.` });
    } catch (err) {
      setStatus({ kind: 'error', text: err instanceof Error ? err.message : 'The link could not be sent.' });
    }
  }

  const errors = form.formState.errors;
  return (
    <div className="space-y-6">
      {status && (
        <p role="status" className={`rounded-md px-3 py-2 text-sm ${status.kind === 'ok' ? 'bg-ok-bg text-ok' : 'bg-danger-bg text-danger'}`}>
          {status.text}
        </p>
      )}
      <section aria-labelledby="invite-heading" className="card">
        <h2 id="invite-heading" className="mb-3">Invite a user</h2>
        <form onSubmit={form.handleSubmit(invite)} className="grid gap-3 sm:grid-cols-2 lg:grid-cols-5 lg:items-end" noValidate>
          <div>
            <label htmlFor="invite-name" className="label">Name</label>
            <input id="invite-name" className="input" aria-invalid={!!errors.name} {...form.register('name')} />
            {errors.name && <p className="field-error">{errors.name.message}</p>}
          </div>
          <div>
            <label htmlFor="invite-email" className="label">E-mail</label>
            <input id="invite-email" type="email" className="input" aria-invalid={!!errors.email} {...form.register('email')} />
            {errors.email && <p className="field-error">{errors.email.message}</p>}
          </div>
          <div>
            <label htmlFor="invite-role" className="label">Role</label>
            <select id="invite-role" className="input" {...form.register('role')}>
              {ROLES.map((r) => (
                <option key={r} value={r}>{ROLE_LABELS[r]}</option>
              ))}
            </select>
          </div>
          {role === 'client' ? (
            <div>
              <label htmlFor="invite-client" className="label">Client record</label>
              <select id="invite-client" className="input" aria-invalid={!!errors.clientId} {...form.register('clientId')}>
                <option value="">Choose…</option>
                {clients.map((c) => (
                  <option key={c.id} value={c.id}>{c.name}</option>
                ))}
              </select>
              {errors.clientId && <p className="field-error">{errors.clientId.message}</p>}
            </div>
          ) : (
            <div className="hidden lg:block" />
          )}
          <button type="submit" className="btn" disabled={form.formState.isSubmitting}>
            {form.formState.isSubmitting ? 'Sending…' : 'Send invitation'}
          </button>
        </form>
      </section>
      <section aria-labelledby="users-heading" className="card overflow-x-auto">
        <h2 id="users-heading" className="mb-3">All users</h2>
        <table>
          <thead>
            <tr>
              <th className="th">Name</th>
              <th className="th">E-mail</th>
              <th className="th">Role</th>
              <th className="th">Status</th>
              <th className="th"><span className="sr-only">Actions</span></th>
            </tr>
          </thead>
          <tbody>
            {users.map((u) => (
              <tr key={u.id}>
                <td className="td font-medium">{u.name}</td>
                <td className="td">{u.email}</td>
                <td className="td">
                  {u.role === 'client' || u.id === meId ? (
                    ROLE_LABELS[u.role]
                  ) : (
                    <select aria-label={`Role of ${u.name}`} className="input py-1" value={u.role} onChange={(e) => change(u.id, { role: e.target.value as Role })}>
                      {ROLES.filter((r) => r !== 'client').map((r) => (
                        <option key={r} value={r}>{ROLE_LABELS[r]}</option>
                      ))}
                    </select>
                  )}
                </td>
                <td className="td">{!u.active ? 'Deactivated' : u.invited ? 'Invited' : 'Active'}</td>
                <td className="td whitespace-nowrap text-right">
                  <span className="inline-flex gap-2">
                    {u.active && (
                      <button type="button" className="btn-secondary py-1" onClick={() => sendLink(u)}>
                        {u.invited ? 'Send a new invitation' : 'Send password reset'}
                        <span className="sr-only"> to {u.name}</span>
                      </button>
                    )}
                    {u.id !== meId && (
                      <button type="button" className={u.active ? 'btn-secondary py-1' : 'btn py-1'} onClick={() => change(u.id, { active: !u.active })}>
                        {u.active ? `Deactivate` : `Reactivate`}
                        <span className="sr-only"> {u.name}</span>
                      </button>
                    )}
                  </span>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </div>
  );
}
