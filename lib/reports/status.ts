/**
 * The state of a signed version and of its PDF, in words. Pure: db/queries/reports.ts derives the
 * state from the version's row.
 *
 * A version is 'current' from signing until a veterinarian amends it; then 'amended' (withdrawn
 * for correction: the collection is unlocked, and no later version is signed yet); and
 * 'superseded' once the corrected report is signed as the next version.
 */
import type { ReportStatus } from '@/lib/validations/report';

export type { ReportStatus };

export function reportStatusOf(row: { amended_at?: unknown; superseded_by?: unknown }): ReportStatus {
  if (row.superseded_by != null) return 'superseded';
  if (row.amended_at != null) return 'amended';
  return 'current';
}

export function reportStatusLabel(status: ReportStatus, supersededByVersion?: number | null): string {
  if (status === 'current') return 'Current';
  if (status === 'amended') return 'Being amended — a corrected version will replace it';
  return supersededByVersion ? `Superseded by version ${supersededByVersion}` : 'Superseded';
}

/** The PDF of a version: stored (with its checksum), being prepared (with the last failure, if a retry waits), or failed for good. */
export type PdfState =
  | { status: 'stored'; sha256: string; bytes: number; storedAt: string }
  | { status: 'preparing'; attempts: number; error: string | null; retryAt: string | null }
  | { status: 'failed'; attempts: number; error: string };

export function pdfStateOf(row: {
  pdf_sha256?: string | null;
  pdf_bytes?: number | null;
  pdf_stored_at?: Date | string | null;
  job_status?: string | null;
  job_attempts?: number | null;
  job_error?: string | null;
  job_run_after?: Date | string | null;
}): PdfState {
  if (row.pdf_sha256) return { status: 'stored', sha256: row.pdf_sha256, bytes: Number(row.pdf_bytes ?? 0), storedAt: new Date(row.pdf_stored_at ?? 0).toISOString() };
  // Signing queues the render in its own transaction; a version without a job is shown as failed, never as waiting forever.
  if (row.job_status == null) return { status: 'failed', attempts: 0, error: 'No PDF is queued for this version; retry to make it.' };
  if (row.job_status === 'failed') return { status: 'failed', attempts: Number(row.job_attempts ?? 0), error: row.job_error ?? 'The PDF could not be made.' };
  const waitingRetry = row.job_status === 'waiting' && row.job_error;
  return {
    status: 'preparing',
    attempts: Number(row.job_attempts ?? 0),
    error: row.job_error ?? null,
    retryAt: waitingRetry && row.job_run_after ? new Date(row.job_run_after).toISOString() : null,
  };
}
