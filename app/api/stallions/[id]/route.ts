import { getStallion, updateStallion } from '@/db/queries/stallions';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { stallionSchema } from '@/lib/validations/stallion';

export const GET = route({ roles: [...STAFF_ROLES, 'client'], params: idParams }, async ({ user, params }) => ({ stallion: await getStallion(user, params.id) }));

export const PATCH = route({ roles: STAFF_ROLES, params: idParams, body: stallionSchema }, async ({ user, params, body }) => ({
  stallion: await updateStallion(user, params.id, body),
}));
