import { syncMarks } from '@/db/queries/mark-sync';
import { route } from '@/lib/api/handler';
import { READER_ROLES } from '@/lib/auth/roles';
import { readParams, syncSchema } from '@/lib/validations/mark';

export const POST = route({ roles: READER_ROLES, params: readParams, body: syncSchema }, async ({ user, params, body }) => syncMarks(user, params.id, body.changes));
