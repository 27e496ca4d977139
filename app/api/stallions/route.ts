import { createStallion, listStallions } from '@/db/queries/stallions';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { stallionListQuery, stallionSchema } from '@/lib/validations/stallion';

// Clients may list, and see only their own stallions (filtered in db/queries).
export const GET = route({ roles: [...STAFF_ROLES, 'client'], query: stallionListQuery }, async ({ user, query }) => listStallions(user, query));

export const POST = route({ roles: STAFF_ROLES, body: stallionSchema }, async ({ user, body }) =>
  Response.json({ stallion: await createStallion(user, body) }, { status: 201 }),
);
