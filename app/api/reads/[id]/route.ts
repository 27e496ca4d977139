import { getReadDetail } from '@/db/queries/reads';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { readParams } from '@/lib/validations/mark';

export const GET = route({ roles: STAFF_ROLES, params: readParams }, async ({ user, params }) => getReadDetail(user, params.id));
