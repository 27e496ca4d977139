import { getSettleState, saveDecisions } from '@/db/queries/settling';
import { route } from '@/lib/api/handler';
import { READER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { decisionsSchema } from '@/lib/validations/settle';

/** The collection's disagreements, both readers' marks, the images and the decisions so far. */
export const GET = route({ roles: STAFF_ROLES, params: idParams }, ({ user, params }) => getSettleState(user, params.id));

/** Decisions on disagreements (idempotent by opId); the settled read is written with the last one. */
export const POST = route({ roles: READER_ROLES, params: idParams, body: decisionsSchema }, ({ user, params, body }) =>
  saveDecisions(user, params.id, body.decisions.map((d) => ({ opId: d.opId, key: d.key, decision: d.decision, classKey: d.classKey ?? null }))),
);
