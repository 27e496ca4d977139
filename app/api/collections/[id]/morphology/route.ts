import { morphologyForCollection } from '@/db/queries/reads';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ params }) => ({ reads: await morphologyForCollection(params.id) }));
