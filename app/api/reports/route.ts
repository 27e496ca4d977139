import { listReports } from '@/db/queries/reports';
import { route } from '@/lib/api/handler';
import { ROLES } from '@/lib/auth/roles';
import { reportListQuery } from '@/lib/validations/report';

/** Signed reports the user may see (a client: their own stallions' only), newest first, paged. */
export const GET = route({ roles: ROLES, query: reportListQuery }, async ({ user, query }) => listReports(user, query));
