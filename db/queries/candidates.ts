import 'server-only';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import { toSkip } from '@/db/queries/candidate-skips';
import { getLabSettings } from '@/db/queries/settings';
import { enqueueDetection, parseParams, type JobStatus } from '@/lib/candidates/jobs';
import { skippedText } from '@/lib/candidates/skipped';
import { wakeWorker } from '@/lib/workers/wake';
import type { CandidateSkip, ImageCandidateSet } from '@/lib/scoring/types';

export type ImageCandidates = {
  status: JobStatus;
  candidates: { x: number; y: number; score: number }[];
  method: string | null;
  params: unknown;
  ms: number | null;
  /** Why the last attempt failed (also while a retry waits). */
  error: string | null;
  /** A done search that gave no candidates on purpose, in a technician's words (lib/candidates/skipped.ts). */
  skipped: string | null;
  attempts: number;
};

/** The image's candidates (image pixels) once found, and the job's state until then. */
export async function getImageCandidates(imageId: number): Promise<ImageCandidates> {
  const image = await db('field_images').where({ id: imageId }).first('id');
  if (!image) throw notFound('The field image');
  const job = await db('candidate_jobs').where({ image_id: imageId }).first();
  if (!job) {
    return { status: 'failed', candidates: [], method: null, params: null, ms: null, error: 'Finding cells was never queued for this image; ask for it again.', skipped: null, attempts: 0 };
  }
  const done = job.status === 'done';
  const params = done ? parseParams(job.params) : null;
  const candidates = done ? await db('candidates').where({ image_id: imageId }).orderBy('id').select('x', 'y', 'score') : [];
  return {
    status: job.status,
    candidates: candidates.map((c) => ({ x: Number(c.x), y: Number(c.y), score: Number(c.score) })),
    method: done ? job.method : null,
    params,
    skipped: skippedText(params),
    ms: done ? job.ms : null,
    error: job.error ?? null,
    attempts: job.attempts,
  };
}

/** Queues the image for a new search; its previous candidates are cleared. */
export async function rerunCandidates(actor: CurrentUser, imageId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const image = await trx('field_images').where({ id: imageId }).forUpdate().first('id');
    if (!image) throw notFound('The field image');
    const before = await trx('candidate_jobs').where({ image_id: imageId }).first('status', 'method');
    await enqueueDetection(trx, imageId, actor.id);
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'candidates', entityId: imageId, before: before ?? null, after: { status: 'waiting', rerun: true } });
  });
  wakeWorker('candidates');
}

/**
 * What the scoring page's walk needs beside the marks: every image's candidates (the image's, the
 * same for both readers) and this read's skips, which only the read's own reader gets.
 */
export async function readWalkData(
  user: CurrentUser,
  read: { id: number; readerId: number },
  imageIds: number[],
): Promise<{ candidates: Record<string, ImageCandidateSet>; skips: CandidateSkip[]; candidatesShown: boolean }> {
  const own = user.id === read.readerId;
  const [jobs, points, skips, settings] = await Promise.all([
    imageIds.length ? db('candidate_jobs').whereIn('image_id', imageIds).select('image_id', 'status', 'params') : [],
    imageIds.length
      ? db('candidates as c').join('candidate_jobs as j', 'j.image_id', 'c.image_id').where('j.status', 'done').whereIn('c.image_id', imageIds).orderBy('c.id').select('c.image_id', 'c.x', 'c.y', 'c.score')
      : [],
    own ? db('candidate_skips').where({ read_id: read.id, deleted: false }).orderBy('created_at') : [],
    getLabSettings(),
  ]);
  const candidates: Record<string, ImageCandidateSet> = {};
  for (const id of imageIds) candidates[String(id)] = { status: 'failed', points: [] };
  for (const j of jobs) {
    const skipped = j.status === 'done' ? skippedText(parseParams(j.params)) : null;
    candidates[String(j.image_id)] = { status: j.status, points: [], ...(skipped ? { skipped } : {}) };
  }
  for (const c of points) candidates[String(c.image_id)]?.points.push({ x: Number(c.x), y: Number(c.y), score: Number(c.score) });
  return { candidates, skips: skips.map(toSkip), candidatesShown: settings.showCandidates };
}
