import { getCollectionReport, saveReportText } from '@/db/queries/reports';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { reportTextSchema } from '@/lib/validations/report';

/** The collection's report for the staff: the draft as it stands (what signing would freeze), its readiness and every signed version. */
export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => getCollectionReport(user, params.id));

/** The veterinarian's remarks and interpretation, before signing. */
export const PUT = route({ roles: ['veterinarian'], params: idParams, body: reportTextSchema }, async ({ user, params, body }) => ({ text: await saveReportText(user, params.id, body) }));
