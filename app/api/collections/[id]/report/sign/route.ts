import { signReport } from '@/db/queries/reports';
import { route } from '@/lib/api/handler';
import { requestAddress } from '@/lib/auth/request-address';
import { idParams } from '@/lib/validations/common';
import { signReportSchema } from '@/lib/validations/report';

/** Sign-off: a veterinarian, with their password re-entered (401 when wrong; 409 with every reason while the report is not ready). */
export const POST = route({ roles: ['veterinarian'], params: idParams, body: signReportSchema }, async ({ req, user, params, body }) =>
  Response.json({ report: await signReport(user, params.id, body, requestAddress((name) => req.headers.get(name))) }, { status: 201 }),
);
