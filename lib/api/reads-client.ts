// Browser-side calls of the reads API that are more than a plain JSON fetch.
import type { ReadDetail } from '@/lib/scoring/types';

export type SubmitAnswer = { ok: true; read: Partial<ReadDetail> } | { ok: false; message: string };

/**
 * POST /api/reads/:id/submit. A 409 means the read is already submitted (another tab, a resent
 * click): the read is locked either way, so it counts as done.
 */
export async function submitReadRequest(readId: string | number): Promise<SubmitAnswer> {
  try {
    const res = await fetch(`/api/reads/${encodeURIComponent(String(readId))}/submit`, { method: 'POST', headers: { 'content-type': 'application/json' } });
    const body = (await res.json().catch(() => null)) as { read?: Partial<ReadDetail>; error?: { message?: string } } | null;
    if (res.ok || res.status === 409) return { ok: true, read: body?.read ?? {} };
    return { ok: false, message: body?.error?.message ?? `The server answered ${res.status}.` };
  } catch {
    return { ok: false, message: 'The server could not be reached. Try again when the connection is back.' };
  }
}
