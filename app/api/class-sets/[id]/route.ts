import { updateClassSet } from '@/db/queries/class-sets';
import { route } from '@/lib/api/handler';
import { idParams } from '@/lib/validations/common';
import { classSetUpdateSchema } from '@/lib/validations/class-set';

export const PUT = route({ roles: ['lab_manager'], params: idParams, body: classSetUpdateSchema }, async ({ user, params, body }) => ({
  classSet: await updateClassSet(user, params.id, body),
}));
