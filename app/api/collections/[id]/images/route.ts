import { requireRecord } from '@/db/queries/records';
import { listImages, setCollectionScale, uploadImage } from '@/db/queries/images';
import { route } from '@/lib/api/handler';
import { READER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { collectionScaleSchema, uploadQuery } from '@/lib/validations/image';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => {
  await requireRecord('collections', params.id);
  return { images: await listImages(user, params.id) };
});

/** One file per request, sent as the raw body (streamed to disk, never held whole in memory). */
export const POST = route({ roles: READER_ROLES, params: idParams, query: uploadQuery }, async ({ req, user, params, query }) => {
  const { image, duplicate } = await uploadImage(user, params.id, req.body, {
    fileName: query.name,
    micronsPerPixel: query.micronsPerPixel,
    magnification: query.magnification,
    optics: query.optics,
  });
  return Response.json({ image, duplicate }, { status: duplicate ? 200 : 201 });
});

/** Applies one scale (e.g. from a stage-micrometer calibration) to every image of the collection. */
export const PATCH = route({ roles: READER_ROLES, params: idParams, body: collectionScaleSchema }, async ({ user, params, body }) => ({
  updated: await setCollectionScale(user, params.id, body.micronsPerPixel),
}));
