import { createHealthEvent, listHealthEvents } from '@/db/queries/health-events';
import { route } from '@/lib/api/handler';
import { HEALTH_EVENT_WRITER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { healthEventSchema } from '@/lib/validations/health-event';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => ({ events: await listHealthEvents(user, params.id) }));

export const POST = route({ roles: HEALTH_EVENT_WRITER_ROLES, params: idParams, body: healthEventSchema }, async ({ user, params, body }) =>
  Response.json({ event: await createHealthEvent(user, params.id, body) }, { status: 201 }),
);
