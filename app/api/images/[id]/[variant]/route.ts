import { create as contentDisposition } from 'content-disposition';
import { Readable } from 'node:stream';
import { getImageRow } from '@/db/queries/images';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { imageVariantParams } from '@/lib/validations/image';
import { get } from '@/storage/s3';

// Served through the app so the role is checked on every request; objects never get public URLs.
export const GET = route({ roles: STAFF_ROLES, params: imageVariantParams }, async ({ params }) => {
  const row = await getImageRow(params.id);
  const key = params.variant === 'display' ? row.display_key : params.variant === 'thumb' ? row.thumb_key : row.original_key;
  const obj = await get(key);
  const headers: Record<string, string> = {
    'content-type': obj.contentType ?? 'application/octet-stream',
    'cache-control': 'private, max-age=3600, immutable',
  };
  if (obj.contentLength != null) headers['content-length'] = String(obj.contentLength);
  // RFC 6266: an ASCII fallback name plus filename*=UTF-8''…, so any file name survives the header.
  if (params.variant === 'original') headers['content-disposition'] = contentDisposition(row.file_name);
  return new Response(Readable.toWeb(obj.body) as ReadableStream, { headers });
});
