import { agreementFor } from '@/db/queries/agreement';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';

/** The agreement of the latest submitted first and second reads; 409 until both are submitted, and while the asker's own second read is open. */
export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => ({ agreement: await agreementFor(user, params.id) }));
