import { requireRecord } from '@/db/queries/records';
import { listReads, startRead } from '@/db/queries/reads';
import { route } from '@/lib/api/handler';
import { READER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { startReadSchema } from '@/lib/validations/mark';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ user, params }) => {
  await requireRecord('collections', params.id);
  return { reads: await listReads(user, params.id) };
});

export const POST = route({ roles: READER_ROLES, params: idParams, body: startReadSchema }, async ({ user, params, body }) => {
  const { read, created } = await startRead(user, params.id, body.kind);
  return Response.json({ read }, { status: created ? 201 : 200 });
});
