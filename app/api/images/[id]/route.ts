import { deleteImage, updateImage } from '@/db/queries/images';
import { route } from '@/lib/api/handler';
import { READER_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { imageUpdateSchema } from '@/lib/validations/image';

export const PATCH = route({ roles: READER_ROLES, params: idParams, body: imageUpdateSchema }, async ({ user, params, body }) => {
  await updateImage(user, params.id, body);
  return { ok: true };
});

export const DELETE = route({ roles: READER_ROLES, params: idParams }, async ({ user, params }) => {
  await deleteImage(user, params.id);
  return { ok: true };
});
