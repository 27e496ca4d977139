import { create as contentDisposition } from 'content-disposition';
import { reportPdf, retryReportPdf } from '@/db/queries/reports';
import { route } from '@/lib/api/handler';
import { ROLES } from '@/lib/auth/roles';
import { reportPdfFilename } from '@/lib/reports/email';
import { idParams } from '@/lib/validations/common';

/** The signed PDF, byte for byte as stored (409 while it is being prepared). */
export const GET = route({ roles: ROLES, params: idParams }, async ({ user, params }) => {
  const pdf = await reportPdf(user, params.id);
  return new Response(new Uint8Array(pdf.bytes), {
    headers: {
      'content-type': 'application/pdf',
      'content-length': String(pdf.bytes.length),
      'content-disposition': contentDisposition(reportPdfFilename(pdf.snapshot)),
      // RFC 9530: the checksum the report's verification page shows, for anyone who wants to compare.
      'repr-digest': `sha-256=:${Buffer.from(pdf.sha256, 'hex').toString('base64')}:`,
      'cache-control': 'private, no-store',
    },
  });
});

/** Queues a failed render again. */
export const POST = route({ roles: ['veterinarian', 'lab_manager'], params: idParams }, async ({ user, params }) => ({ pdf: await retryReportPdf(user, params.id) }));
