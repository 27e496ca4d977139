import { submitRead } from '@/db/queries/reads';
import { route } from '@/lib/api/handler';
import { READER_ROLES } from '@/lib/auth/roles';
import { readParams } from '@/lib/validations/mark';

export const POST = route({ roles: READER_ROLES, params: readParams }, async ({ user, params }) => ({ read: await submitRead(user, params.id) }));
