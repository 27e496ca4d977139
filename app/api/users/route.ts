import { inviteUser, listUsers } from '@/db/queries/users';
import { route } from '@/lib/api/handler';
import { inviteSchema } from '@/lib/validations/auth';

export const GET = route({ roles: ['lab_manager'] }, async () => ({ users: await listUsers() }));

export const POST = route({ roles: ['lab_manager'], body: inviteSchema }, async ({ user, body }) => {
  const { user: invited } = await inviteUser(user, body);
  return Response.json({ user: invited }, { status: 201 });
});
