import { createClient, listClients } from '@/db/queries/clients';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { clientListQuery, clientSchema } from '@/lib/validations/client';

export const GET = route({ roles: STAFF_ROLES, query: clientListQuery }, async ({ query }) => listClients(query));

export const POST = route({ roles: STAFF_ROLES, body: clientSchema }, async ({ user, body }) =>
  Response.json({ client: await createClient(user, body) }, { status: 201 }),
);
