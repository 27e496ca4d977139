import { getCollection, updateCollection } from '@/db/queries/collections';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { collectionSchema } from '@/lib/validations/collection';
import { idParams } from '@/lib/validations/common';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => ({ collection: await getCollection(user, params.id) }));

export const PATCH = route({ roles: STAFF_ROLES, params: idParams, body: collectionSchema }, async ({ user, params, body }) => ({
  collection: await updateCollection(user, params.id, body),
}));
