import { requireRecord } from '@/db/queries/records';
import { listReads, startFirstRead } from '@/db/queries/reads';
import { route } from '@/lib/api/handler';
import { READER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { idParams } from '@/lib/validations/common';
import { startReadSchema } from '@/lib/validations/mark';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ params }) => {
  await requireRecord('collections', params.id);
  return { reads: await listReads(params.id) };
});

export const POST = route({ roles: READER_ROLES, params: idParams, body: startReadSchema }, async ({ user, params }) => {
  const { read, created } = await startFirstRead(user, params.id);
  return Response.json({ read }, { status: created ? 201 : 200 });
});
