/**
 * The database refuses every change to a collection that carries a signed report, and every
 * change to a signed version itself, with SQLSTATE 45000 and a message of its own
 * (db/migrations/20261224000200_signed_report_lock.ts). This turns that refusal into the API's
 * 409, once, for the route wrapper and anything else that catches errors: no route checks the
 * lock itself. Pure: it only reads the error's fields.
 */
import { ApiError } from '@/lib/api/errors';

export const SIGNED_REPORT_CODE = 'signed_report';
export const FROZEN_REPORT_CODE = 'frozen_report';

export const SIGNED_REPORT_MESSAGE =
  'This collection has a signed report: its record, reads, marks, field images and image scales can no longer change. A veterinarian can amend the report to correct it.';
export const FROZEN_REPORT_MESSAGE = 'A signed report version never changes; an amendment makes a new version.';

type DriverError = { sqlState?: unknown; sqlMessage?: unknown };

/** The 409 for a refusal by the lock or the frozen-version triggers, or null for any other error. */
export function lockRefusal(err: unknown): ApiError | null {
  if (typeof err !== 'object' || err === null) return null;
  const { sqlState, sqlMessage } = err as DriverError;
  if (sqlState !== '45000' || typeof sqlMessage !== 'string') return null;
  if (sqlMessage.startsWith('signed report:')) return new ApiError(409, SIGNED_REPORT_CODE, SIGNED_REPORT_MESSAGE);
  if (sqlMessage.startsWith('frozen report:')) return new ApiError(409, FROZEN_REPORT_CODE, FROZEN_REPORT_MESSAGE);
  return null;
}
