import { historyPointChunks } from '@/db/queries/history';
import { getStallion } from '@/db/queries/stallions';
import { getLabSettings } from '@/db/queries/settings';
import { route } from '@/lib/api/handler';
import { STAFF_ROLES } from '@/lib/auth/roles';
import { exportFileName } from '@/lib/history/export';
import { CSV_TYPE, XLSX_TYPE, csvStream, downloadResponse, xlsxStream } from '@/lib/history/export-stream';
import { exportQuery } from '@/lib/validations/health-event';

/** The lab's collections over a range of days (optionally one stallion's), streamed as CSV or .xlsx. */
export const GET = route({ roles: STAFF_ROLES, query: exportQuery }, async ({ user, query }) => {
  const [stallion, settings] = await Promise.all([query.stallionId ? getStallion(user, query.stallionId) : null, getLabSettings()]);
  const chunks = historyPointChunks(user, { stallionId: stallion?.id, from: query.from, to: query.to });
  const name = exportFileName(stallion ? stallion.name : 'collections', query, query.format);
  return query.format === 'csv'
    ? downloadResponse(csvStream(chunks, settings.timeZone), CSV_TYPE, name)
    : downloadResponse(xlsxStream(chunks, settings.timeZone), XLSX_TYPE, name);
});
