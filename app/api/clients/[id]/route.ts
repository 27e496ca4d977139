import { getClient, updateClient } from '@/db/queries/clients';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { clientSchema } from '@/lib/validations/client';
import { idParams } from '@/lib/validations/common';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ params }) => ({ client: await getClient(params.id) }));

export const PATCH = route({ roles: STAFF_ROLES, params: idParams, body: clientSchema }, async ({ user, params, body }) => ({
  client: await updateClient(user, params.id, body),
}));
