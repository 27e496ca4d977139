import { listUsers } from '@/db/queries/users';
import { clientOptions } from '@/db/queries/clients';
import { requirePageUser } from '@/lib/auth/session';
import { UsersManager } from './_components/users-manager';

export const metadata = { title: 'Users' };

export default async function UsersPage() {
  const me = await requirePageUser(['lab_manager']);
  const [users, clients] = await Promise.all([listUsers(), clientOptions()]);
  return (
    <div className="space-y-6">
      <div>
        <h1>Users</h1>
        <p className="text-sm text-ink-soft">
          Invite staff and clients, change roles and deactivate accounts. A deactivated user cannot sign in; their records stay.
        </p>
      </div>
      <UsersManager initialUsers={users} clients={clients} meId={me.id} />
    </div>
  );
}
