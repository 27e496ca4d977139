import { stallionHistory } from '@/db/queries/history';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { historyQuery } from '@/lib/validations/health-event';

export const GET = route({ roles: STAFF_ROLES, params: idParams, query: historyQuery }, async ({ user, params, query }) => stallionHistory(user, params.id, query));
