import { historyPointChunks } from '@/db/queries/history';
import { getStallion } from '@/db/queries/stallions';
import { getLabSettings } from '@/db/queries/settings';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { exportFileName } from '@/lib/history/export';
import { CSV_TYPE, XLSX_TYPE, csvStream, downloadResponse, xlsxStream } from '@/lib/history/export-stream';
import { idParams } from '@/lib/validations/common';
import { exportQuery } from '@/lib/validations/health-event';

/** A stallion's collections with their figures, streamed as CSV or .xlsx. */
export const GET = route({ roles: STAFF_ROLES, params: idParams, query: exportQuery }, async ({ user, params, query }) => {
  const [stallion, settings] = await Promise.all([getStallion(user, params.id), getLabSettings()]); // 404 before any byte is sent
  const chunks = historyPointChunks(user, { stallionId: stallion.id, from: query.from, to: query.to });
  const name = exportFileName(stallion.name, query, query.format);
  return query.format === 'csv'
    ? downloadResponse(csvStream(chunks, settings.timeZone), CSV_TYPE, name)
    : downloadResponse(xlsxStream(chunks, settings.timeZone, stallion.name), XLSX_TYPE, name);
});
