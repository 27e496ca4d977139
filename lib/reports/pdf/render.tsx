/**
 * renderReportPdf(snapshot) → the PDF as a Buffer. Runs in Node: under tsx and vitest as well as
 * in a route handler or a background job of the app (@react-pdf/renderer stays a server external
 * package). Rendering takes a noticeable fraction of a second (see tests/bench/report-pdf.bench.ts),
 * so the signing route should render after its transaction commits, not inside it.
 */
import { renderToBuffer } from '@react-pdf/renderer';
import { env } from '@/lib/env';
import { parseReportSnapshot, type ReportSnapshot } from '../snapshot';
import { verificationUrl } from '../verification';
import { registerPdfFonts } from './fonts';
import { ReportDocument } from './report-document';

export interface RenderReportOptions {
  /** Public address of the app, for the verification link and QR code; default APP_URL. */
  appUrl?: string;
}

export async function renderReportPdf(snapshot: ReportSnapshot, options: RenderReportOptions = {}): Promise<Buffer> {
  // Checked again here: a hand-made object that contradicts itself must not become a signed-looking PDF.
  const checked = parseReportSnapshot(snapshot);
  registerPdfFonts();
  const verifyUrl = verificationUrl(options.appUrl ?? env().APP_URL, checked.report.verificationCode);
  return renderToBuffer(<ReportDocument snapshot={checked} verifyUrl={verifyUrl} />);
}
