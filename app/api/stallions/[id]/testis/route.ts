import { requireRecord } from '@/db/queries/records';
import { createTestisMeasurement, listTestisMeasurements } from '@/db/queries/testis';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { testisSchema } from '@/lib/validations/collection';
import { idParams } from '@/lib/validations/common';

export const GET = route({ roles: STAFF_ROLES, params: idParams }, async ({ params }) => {
  await requireRecord('stallions', params.id);
  return { measurements: await listTestisMeasurements(params.id) };
});

export const POST = route({ roles: STAFF_ROLES, params: idParams, body: testisSchema }, async ({ user, params, body }) =>
  Response.json({ measurement: await createTestisMeasurement(user, params.id, body) }, { status: 201 }),
);
