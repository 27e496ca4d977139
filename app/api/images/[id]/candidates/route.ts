import { getImageCandidates, rerunCandidates } from '@/db/queries/candidates';
import { jsonResponse, route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';

/** The image's candidate cells (image pixels) and the state of the search for them. */
export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ params }) => getImageCandidates(params.id));

/** Search again (e.g. after the scale was set): queued at once, answered before it runs. */
export const POST = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => {
  await rerunCandidates(user, params.id);
  return jsonResponse({ status: 'waiting' }, 202);
});
