import { NextResponse } from 'next/server';
import { syncMarks } from '@/db/queries/mark-sync';
import { ApiError } from '@/lib/api/errors';
import { route } from '@/lib/api/handler';
import { READER_ROLES } from '@/lib/auth/roles';
import type { SendResult } from '@/lib/scoring/sync-contract';
import { deleteMarkQuery, markParams, putMarkSchema } from '@/lib/validations/mark';

// Single-mark forms of the sync route, with the same rules (idempotent by opId, versioned).
function single(r: SendResult<unknown>) {
  if (r.rejected?.length) throw new ApiError(422, 'invalid_mark', r.rejected[0].message);
  if (r.conflicts?.length) {
    return NextResponse.json({ error: { code: 'conflict', message: 'The mark was changed elsewhere; here is the current copy.' }, server: r.conflicts[0].server }, { status: 409 });
  }
  return r.acked[0];
}

export const PUT = route({ roles: READER_ROLES, params: markParams, body: putMarkSchema }, async ({ user, params, body }) => {
  const { opId, baseVersion, ...mark } = body;
  const ack = single(await syncMarks(user, params.id, [{ opId, markId: params.markId, kind: 'upsert', baseVersion, payload: { ...mark, id: params.markId } }]));
  if (ack instanceof Response) return ack;
  return { mark: { id: params.markId, ...mark, imageId: String(mark.imageId), version: ack.version } };
});

export const DELETE = route({ roles: READER_ROLES, params: markParams, query: deleteMarkQuery }, async ({ user, params, query }) => {
  const ack = single(await syncMarks(user, params.id, [{ opId: query.opId, markId: params.markId, kind: 'delete', baseVersion: query.baseVersion, payload: null }]));
  if (ack instanceof Response) return ack;
  return { ok: true, version: ack.version };
});
