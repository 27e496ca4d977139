import 'server-only';
import { PassThrough, Readable } from 'node:stream';
import { create as contentDisposition } from 'content-disposition';
import { stringify } from 'csv-stringify';
import ExcelJS from 'exceljs';
import { exportHeader, exportRow } from './export';
import type { HistoryPoint } from './series';

/*
 * Collections as a streamed CSV or .xlsx file: rows are written as the chunks of points arrive, so
 * a season of a whole lab never sits in memory. CSV: RFC 4180 via csv-stringify, UTF-8 with a byte
 * order mark (so spreadsheet programs read "°" and accented names right) and a header row.
 * .xlsx: exceljs's streaming WorkbookWriter, one sheet, numbers as numbers, instants as ISO text.
 */

export const CSV_TYPE = 'text/csv; charset=utf-8';
export const XLSX_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';

async function* records(chunks: AsyncIterable<HistoryPoint[]>, timeZone: string) {
  for await (const chunk of chunks) for (const p of chunk) yield exportRow(p, timeZone);
}

/** A Node stream of the CSV file. */
export function csvStream(chunks: AsyncIterable<HistoryPoint[]>, timeZone: string): Readable {
  const out = stringify({ header: true, columns: exportHeader(), bom: true, cast: { number: (v) => String(v) } });
  const source = Readable.from(records(chunks, timeZone));
  source.on('error', (err) => out.destroy(err));
  return source.pipe(out);
}

/** A Node stream of the .xlsx workbook. */
export function xlsxStream(chunks: AsyncIterable<HistoryPoint[]>, timeZone: string, sheetName = 'Collections'): Readable {
  const out = new PassThrough();
  const workbook = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useStyles: true, useSharedStrings: false });
  workbook.creator = 'Fieldmark';
  const sheet = workbook.addWorksheet(sheetName.replace(/[\\/?*[\]:]/g, ' ').slice(0, 31) || 'Collections', { views: [{ state: 'frozen', ySplit: 1 }] });
  (async () => {
    const header = sheet.addRow(exportHeader());
    header.font = { bold: true };
    header.commit();
    for await (const values of records(chunks, timeZone)) sheet.addRow(values.map((v) => v ?? null)).commit();
    sheet.commit();
    await workbook.commit();
  })().catch((err) => out.destroy(err instanceof Error ? err : new Error(String(err))));
  return out;
}

/** A streamed download response. */
export function downloadResponse(body: Readable, contentType: string, fileName: string): Response {
  return new Response(Readable.toWeb(body) as ReadableStream, {
    headers: {
      'content-type': contentType,
      // RFC 6266: an ASCII fallback plus filename*=UTF-8''…, so a stallion's accented name survives.
      'content-disposition': contentDisposition(fileName),
      'cache-control': 'no-store',
    },
  });
}
