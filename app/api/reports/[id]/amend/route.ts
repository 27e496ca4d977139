import { amendReport } from '@/db/queries/reports';
import { route } from '@/lib/api/handler';
import { idParams } from '@/lib/validations/common';
import { amendReportSchema } from '@/lib/validations/report';

/** A veterinarian withdraws the current version for correction, with a reason; signing again makes the next version. */
export const POST = route({ roles: ['veterinarian'], params: idParams, body: amendReportSchema }, async ({ user, params, body }) => ({
  report: await amendReport(user, params.id, body.reason),
}));
