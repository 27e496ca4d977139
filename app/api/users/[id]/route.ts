import { updateUser } from '@/db/queries/users';
import { route } from '@/lib/api/handler';
import { userUpdateSchema } from '@/lib/validations/auth';
import { idParams } from '@/lib/validations/common';

export const PATCH = route({ roles: ['lab_manager'], params: idParams, body: userUpdateSchema }, async ({ user, params, body }) => ({
  user: await updateUser(user, params.id, body),
}));
