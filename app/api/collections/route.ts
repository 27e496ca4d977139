import { createCollection, listCollections } from '@/db/queries/collections';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { collectionListQuery, collectionSchema } from '@/lib/validations/collection';

export const GET = route({ roles: STAFF_ROLES, query: collectionListQuery }, async ({ user, query }) => listCollections(user, query));

export const POST = route({ roles: STAFF_ROLES, body: collectionSchema }, async ({ user, body }) =>
  Response.json({ collection: await createCollection(user, body) }, { status: 201 }),
);
