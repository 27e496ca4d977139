import { requireRecord } from '@/db/queries/records';
import { morphologyForCollection, morphologyJson } from '@/db/queries/morphology';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => {
  await requireRecord('collections', params.id);
  return { reads: (await morphologyForCollection(user, params.id)).map(morphologyJson) };
});
