import { getReport } from '@/db/queries/reports';
import { route } from '@/lib/api/handler';
import { ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';

/** One signed version: its frozen snapshot, state, PDF state, versions, and (staff) its sendings. */
export const GET = route({ roles: ROLES, params: idParams }, async ({ user, params }) => ({ report: await getReport(user, params.id) }));
