import 'server-only';
import type { Transporter } from 'nodemailer';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { getReport, reportPdf, type ReportSending } from '@/db/queries/reports';
import { ApiError, conflict, forbidden, invalid } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import { env } from '@/lib/env';
import { sendMail } from '@/lib/mail/send';
import { composeReportEmail } from '@/lib/reports/email';
import type { SendReportValues } from '@/lib/validations/report';

/*
 * Sending a signed report by e-mail: one message per recipient (so each gets its own answer),
 * the stored PDF attached as it is, and one record per recipient of what the relay said. A relay
 * that refuses gives a "not sent" record and a clear error; nothing claims a refused message was sent.
 */

export const SENDER_ROLES = ['veterinarian', 'lab_manager'] as const;

/** The relay's reply in one line, never longer than the column. */
const reply = (text: unknown) => String(text ?? '').replace(/\s+/g, ' ').trim().slice(0, 1000) || null;

export async function sendReport(actor: CurrentUser, reportId: number, body: SendReportValues, opts: { transport?: Transporter } = {}): Promise<{ sendings: ReportSending[] }> {
  if (!(SENDER_ROLES as readonly string[]).includes(actor.role)) throw forbidden('Only a veterinarian or the lab manager sends reports.');
  const report = await getReport(actor, reportId);
  if (report.status !== 'current') {
    const latest = report.versions[report.versions.length - 1];
    throw conflict(report.status === 'superseded' ? `Version ${report.version} is superseded; send version ${latest?.version ?? report.version + 1} instead.` : `Version ${report.version} is being amended; send the corrected version once it is signed.`);
  }
  const wanted = [...(body.includeOwner && report.ownerEmail ? [report.ownerEmail] : []), ...body.to];
  const recipients = [...new Map(wanted.map((a) => [a.toLowerCase(), a])).values()];
  if (recipients.length === 0) {
    throw invalid(body.includeOwner ? 'The owner has no e-mail address on record; type the addresses to send to.' : 'Type at least one address to send to.', [{ path: 'to', message: 'Add an address.' }]);
  }
  // 409 while the PDF is being prepared; checked against its recorded SHA-256 before it is attached.
  const pdf = await reportPdf(actor, reportId);
  const mail = composeReportEmail({ snapshot: pdf.snapshot, pdf: pdf.bytes, appUrl: env().APP_URL, message: body.message ?? null });

  const results: { recipient: string; status: 'sent' | 'failed'; relay_response: string | null; message_id: string | null }[] = [];
  for (const to of recipients) {
    try {
      const answer = await sendMail({ to, ...mail }, opts.transport);
      const refused = answer.rejected.some((a) => a.toLowerCase() === to.toLowerCase()) || !answer.accepted.some((a) => a.toLowerCase() === to.toLowerCase());
      results.push({ recipient: to, status: refused ? 'failed' : 'sent', relay_response: reply(answer.response), message_id: answer.messageId?.slice(0, 255) ?? null });
    } catch (err) {
      const e = err as { response?: string; message?: string; code?: string };
      results.push({ recipient: to, status: 'failed', relay_response: reply(e.response ?? `${e.code ? `${e.code}: ` : ''}${e.message ?? 'the relay could not be reached'}`), message_id: null });
    }
  }
  await db.transaction(async (trx) => {
    await trx('report_sendings').insert(results.map((r) => ({ ...r, report_id: reportId, note: body.message ?? null, sent_by: actor.id })));
    await writeAudit(trx, { userId: actor.id, action: 'send', entity: 'report', entityId: reportId, after: { results: results.map((r) => ({ to: r.recipient, status: r.status, relay: r.relay_response })) } });
  });
  const failed = results.filter((r) => r.status === 'failed');
  if (failed.length) {
    const sent = results.filter((r) => r.status === 'sent').map((r) => r.recipient);
    throw new ApiError(
      502,
      'relay_refused',
      `Not sent to ${failed.map((f) => `${f.recipient} (the relay answered: ${f.relay_response ?? 'nothing'})`).join('; ')}.${sent.length ? ` Sent to ${sent.join(', ')}.` : ''} Each attempt is recorded on the report page.`,
    );
  }
  return { sendings: (await getReport(actor, reportId)).sendings };
}
