import { sendReport, SENDER_ROLES } from '@/db/queries/report-sendings';
import { route } from '@/lib/api/handler';
import { idParams } from '@/lib/validations/common';
import { sendReportSchema } from '@/lib/validations/report';

/** E-mails the signed PDF to the owner and the addresses typed in; 502 (with every attempt recorded) when the relay refuses. */
export const POST = route({ roles: SENDER_ROLES, params: idParams, body: sendReportSchema }, async ({ user, params, body }) =>
  Response.json(await sendReport(user, params.id, body), { status: 201 }),
);
