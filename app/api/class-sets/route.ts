import { createClassSet, listClassSets } from '@/db/queries/class-sets';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { classSetSchema } from '@/lib/class-sets/schema';

export const GET = route({ roles: STAFF_ROLES }, async () => ({ classSets: await listClassSets() }));

export const POST = route({ roles: ['lab_manager'], body: classSetSchema }, async ({ user, body }) =>
  Response.json({ classSet: await createClassSet(user, body) }, { status: 201 }),
);
