import { deleteHealthEvent, getHealthEvent, updateHealthEvent } from '@/db/queries/health-events';
import { route } from '@/lib/api/handler';
import { HEALTH_EVENT_WRITER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { healthEventSchema } from '@/lib/validations/health-event';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => ({ event: await getHealthEvent(user, params.id) }));

export const PATCH = route({ roles: HEALTH_EVENT_WRITER_ROLES, params: idParams, body: healthEventSchema }, async ({ user, params, body }) => ({
  event: await updateHealthEvent(user, params.id, body),
}));

export const DELETE = route({ roles: HEALTH_EVENT_WRITER_ROLES, params: idParams }, async ({ user, params }) => deleteHealthEvent(user, params.id));
