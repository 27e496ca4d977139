import 'server-only';
import type { Knex } from 'knex';
import type { Row } from '@/db/row';
import type { CurrentUser } from '@/lib/auth/session';
import type { SendResult } from '@/lib/scoring/sync-contract';
import type { CandidateSkip } from '@/lib/scoring/types';
import type { SkipChangeInput } from '@/lib/validations/mark';

/*
 * Skipped candidates ("not a cell"), saved by the same sync route and queue as marks: per read,
 * idempotent by op id, versioned, an undone skip kept as a deleted row so a redo restores its id.
 * The caller has checked the read is the user's and open (checkWritable in db/queries/reads.ts);
 * only the read's own payload carries them (readWalkData in db/queries/candidates.ts).
 */

export function toSkip(r: Row): CandidateSkip {
  return { id: r.id, imageId: String(r.image_id), x: Number(r.x), y: Number(r.y), skip: true, version: r.version };
}

/** Applies a batch of skip changes inside the sync transaction, to a read the caller checked is writable. */
export async function applySkipChanges(trx: Knex.Transaction, user: CurrentUser, read: Row, changes: SkipChangeInput[]): Promise<Required<SendResult<CandidateSkip>>> {
  const readId: number = read.id;
  const imageIds = [...new Set(changes.flatMap((c) => (c.payload ? [c.payload.imageId] : [])))];
  const images = new Map<number, Row>(
    (imageIds.length ? await trx('field_images').where({ collection_id: read.collection_id }).whereIn('id', imageIds).select('id', 'width', 'height') : []).map((i) => [i.id, i]),
  );
  const ids = [...new Set(changes.map((c) => c.markId))];
  const rows = new Map<string, Row>((await trx('candidate_skips').whereIn('id', ids).forUpdate()).map((r) => [r.id, r]));
  const done = new Map<string, number>();
  for (const o of await trx('candidate_skip_ops').whereIn('op_id', changes.map((c) => c.opId)).select('op_id', 'version')) done.set(o.op_id, o.version);

  const result: Required<SendResult<CandidateSkip>> = { acked: [], conflicts: [], rejected: [] };
  const now = trx.fn.now(3);
  for (const c of changes) {
    const seen = done.get(c.opId);
    if (seen !== undefined) {
      result.acked.push({ opId: c.opId, markId: c.markId, version: seen });
      continue;
    }
    const row = rows.get(c.markId);
    if (row && row.read_id !== readId) {
      result.rejected.push({ opId: c.opId, markId: c.markId, message: 'This skipped candidate belongs to another read.' });
      continue;
    }
    if (row && c.baseVersion !== undefined && c.baseVersion !== row.version) {
      result.conflicts.push({ opId: c.opId, markId: c.markId, server: row.deleted ? null : toSkip(row) });
      continue;
    }
    let next: Row;
    if (c.kind === 'delete') {
      if (!row || row.deleted) {
        result.acked.push({ opId: c.opId, markId: c.markId, version: row?.version ?? 0 });
        continue;
      }
      next = { ...row, deleted: true, version: row.version + 1 };
    } else {
      const p = c.payload!;
      const img = images.get(p.imageId);
      const problem =
        p.id && p.id !== c.markId
          ? 'The skip id in the change and in the skip differ.'
          : !img
            ? 'The image does not belong to this collection.'
            : p.x < 0 || p.y < 0 || p.x > img.width || p.y > img.height
              ? `The skipped candidate (${Math.round(p.x)}, ${Math.round(p.y)}) lies outside the ${img.width} × ${img.height} image.`
              : null;
      if (problem) {
        result.rejected.push({ opId: c.opId, markId: c.markId, message: problem });
        continue;
      }
      next = { ...(row ?? { id: c.markId, read_id: readId }), image_id: p.imageId, x: Math.round(p.x * 100) / 100, y: Math.round(p.y * 100) / 100, deleted: false, version: row ? row.version + 1 : 1 };
    }
    const values = { id: c.markId, read_id: readId, image_id: next.image_id, x: next.x, y: next.y, version: next.version, deleted: Boolean(next.deleted), last_op_id: c.opId, updated_by: user.id, updated_at: now };
    if (row) await trx('candidate_skips').where({ id: c.markId }).update(values);
    else await trx('candidate_skips').insert(values);
    rows.set(c.markId, { ...next, last_op_id: c.opId });
    await trx('candidate_skip_ops').insert({ op_id: c.opId, skip_id: c.markId, read_id: readId, version: next.version });
    done.set(c.opId, next.version);
    result.acked.push({ opId: c.opId, markId: c.markId, version: next.version });
  }
  return result;
}
