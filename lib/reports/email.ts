/**
 * The e-mail that carries a signed report: subject, plain text and HTML bodies, and the PDF as
 * an attachment. Pure: the sending route passes the result to lib/mail/send.ts
 * (`sendMail({ to, ...composeReportEmail(...) })`) and records the relay's answer.
 *
 * Everything a person typed (stallion and owner names, the lab's name) is escaped in the HTML.
 * The attachment's file name keeps the stallion's name in any script (nodemailer writes it with
 * RFC 2231 encoding); only characters that no file system accepts are replaced.
 */
import { billions, fmt, fmtDate, fmtDateTime } from '@/lib/format';
import { isTimeZone, labDayKey } from '@/lib/time/lab-time';
import { REPORT_TITLE, supersededLine, versionLine } from './labels';
import type { ReportSnapshot } from './snapshot';
import { verificationUrl } from './verification';

export interface ReportEmailAttachment {
  filename: string;
  content: Buffer;
  contentType: 'application/pdf';
}

export interface ReportEmail {
  subject: string;
  text: string;
  html: string;
  attachments: ReportEmailAttachment[];
}

export interface ReportEmailInput {
  snapshot: ReportSnapshot;
  /** The stored, signed PDF (attached as is). */
  pdf: Buffer;
  /** Public address of the app, for the verification link. */
  appUrl: string;
  /** An optional note from the sender, shown above the summary. */
  message?: string | null;
}

// Characters Windows, macOS or Linux refuse in file names, and control characters.
const UNSAFE_IN_FILENAMES = /[\u0000-\u001f\u007f-\u009f<>:"/\\|?*\u200b-\u200f\u2028-\u202e\u2066-\u2069]/g;
const MAX_NAME_CHARS = 80;

/** A file name part: NFC, unsafe characters replaced, spaces collapsed, at most 80 characters (never half a character). */
export function safeFilenamePart(text: string): string {
  const cleaned = text.normalize('NFC').replace(UNSAFE_IN_FILENAMES, '_').replace(/\s+/g, ' ').trim().replace(/^[.\s]+|[.\s]+$/g, '');
  const chars = [...cleaned];
  return (chars.length > MAX_NAME_CHARS ? chars.slice(0, MAX_NAME_CHARS).join('').trim() : cleaned) || 'report';
}

const zoneOf = (s: ReportSnapshot) => (isTimeZone(s.settings.timeZone) ? s.settings.timeZone : 'UTC');

/** "Thistlewick Lantern 2026-05-26 report v2.pdf": the lab's day of the collection, in any language. */
export function reportPdfFilename(s: ReportSnapshot): string {
  return `${safeFilenamePart(s.stallion.name)} ${labDayKey(new Date(s.collection.collectedAt), zoneOf(s))} report v${s.report.version}.pdf`;
}

/** An ASCII-only variant, for a Content-Disposition `filename=` beside `filename*=UTF-8''…`. */
export function asciiFilename(filename: string): string {
  return filename
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[^\x20-\x7e]/g, '_')
    .replace(/["\\]/g, '_');
}

const escapeHtml = (text: string) =>
  text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export function composeReportEmail({ snapshot: s, pdf, appUrl, message }: ReportEmailInput): ReportEmail {
  const tz = zoneOf(s);
  const collected = fmtDate(s.collection.collectedAt, tz);
  const url = verificationUrl(appUrl, s.report.verificationCode);
  const superseded = supersededLine(s.report);
  const m = s.morphology;
  const normal =
    m.pctNormal === null
      ? 'no cells counted'
      : `${fmt(m.pctNormal, 1)} % normal (95 % interval ${fmt(m.normalInterval!.lowerPct, 1)}–${fmt(m.normalInterval!.upperPct, 1)} %) of ${m.cellsCounted} sperm cells`;
  const pmmn = s.semen.pmmnBillion === null ? null : `PMMN ${billions(s.semen.pmmnBillion)}`;
  const signed = `Signed by ${s.people.signedBy.name} on ${fmtDateTime(s.people.signedAt, tz)}`;
  const filename = reportPdfFilename(s);
  const note = message?.trim() || null;

  const summary = [
    `Stallion: ${s.stallion.name}${s.stallion.registration ? ` (${s.stallion.registration})` : ''}`,
    `Collected: ${fmtDateTime(s.collection.collectedAt, tz)}`,
    `Morphology: ${normal}${s.morphology.source === 'single' ? ', from a single read' : ''}`,
    ...(pmmn ? [pmmn] : []),
    versionLine(s.report),
    ...(superseded ? [superseded] : []),
    signed,
  ];
  const cautions = s.cautions.filter((c) => c.title === 'Decisions').map((c) => c.text);

  const text = [
    ...(note ? [note, ''] : []),
    `${s.lab.name} sends you the signed ${REPORT_TITLE.toLowerCase()} for ${s.stallion.name}, collected on ${collected}.`,
    '',
    'The attached PDF is the signed report; the figures below are a summary of it.',
    '',
    ...summary,
    '',
    `Verification code: ${s.report.verificationCode}`,
    `Check that the report is genuine and current: ${url}`,
    '',
    ...cautions,
    '',
    `— ${s.lab.name}`,
  ].join('\n');

  const li = (t: string) => `<li>${escapeHtml(t)}</li>`;
  const html = `<!doctype html>
<html lang="en-GB"><head><meta charset="utf-8"><title>${escapeHtml(REPORT_TITLE)}</title></head>
<body style="font-family: Inter, Arial, sans-serif; font-size: 15px; line-height: 1.45; color: #1a1a1a; max-width: 640px">
${note ? `<p style="white-space: pre-line">${escapeHtml(note)}</p>\n` : ''}<p>${escapeHtml(s.lab.name)} sends you the signed ${escapeHtml(REPORT_TITLE.toLowerCase())} for <strong>${escapeHtml(s.stallion.name)}</strong>, collected on ${escapeHtml(collected)}.</p>
<p><strong>The attached PDF is the signed report</strong>; the figures below are a summary of it.</p>
<ul>
${summary.map(li).join('\n')}
</ul>
<p>Verification code: <strong style="font-family: monospace; letter-spacing: 0.05em">${escapeHtml(s.report.verificationCode)}</strong><br>
Check that the report is genuine and current: <a href="${escapeHtml(url)}">${escapeHtml(url)}</a></p>
${cautions.map((c) => `<p style="color: #555555; font-size: 13px">${escapeHtml(c)}</p>`).join('\n')}
<p>— ${escapeHtml(s.lab.name)}</p>
</body></html>
`;

  return {
    subject: `${REPORT_TITLE}: ${s.stallion.name}, collected ${collected} (version ${s.report.version})`,
    text,
    html,
    attachments: [{ filename, content: pdf, contentType: 'application/pdf' }],
  };
}
