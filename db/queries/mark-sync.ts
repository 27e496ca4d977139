import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { checkWritable, toMark } from '@/db/queries/reads';
import { json, type Row } from '@/db/row';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet, MarkClass } from '@/lib/class-sets/schema';
import type { SendResult } from '@/lib/scoring/sync-contract';
import type { CandidateSkip, ScoringMark } from '@/lib/scoring/types';
import { applySkipChanges } from '@/db/queries/candidate-skips';
import type { ChangeInput, SkipChangeInput, SyncChangeInput } from '@/lib/validations/mark';

/*
 * Mark saves from the scoring canvas (POST /api/reads/:id/sync and the single-mark routes).
 * A mark stores what the reader decided (class key and tags) and nothing derived from it: the
 * figures come from the read's class-set snapshot, through lib/morphology/engine.ts.
 */

type ImageBox = { id: number; width: number; height: number };

function checkMark(c: ChangeInput, images: Map<number, ImageBox>, classes: Map<string, MarkClass>): string | null {
  const p = c.payload!;
  if (p.id && p.id !== c.markId) return 'The mark id in the change and in the mark differ.';
  const img = images.get(p.imageId);
  if (!img) return 'The image does not belong to this collection.';
  if (p.x < 0 || p.y < 0 || p.x > img.width || p.y > img.height) return `The mark (${Math.round(p.x)}, ${Math.round(p.y)}) lies outside the ${img.width} × ${img.height} image.`;
  const cls = classes.get(p.classKey);
  if (!cls) return `“${p.classKey}” is not a class of this read’s class set.`;
  for (const t of p.tags) {
    const tag = classes.get(t);
    if (!tag || !tag.countsAsSperm || tag.group === 'normal') return `“${t}” is not a defect class that can be added as an extra tag.`;
  }
  if (!cls.countsAsSperm && p.tags.length) return 'Non-sperm cells carry no defect tags.';
  return null;
}

/** Columns a save writes; the rest (id, read_id, created_at) are set once. */
const MARK_COLUMNS = ['image_id', 'x', 'y', 'class_key', 'tags', 'version', 'deleted', 'last_op_id', 'updated_by', 'updated_at'] as const;

/**
 * Applies a batch of mark changes made in the browser. Each change is idempotent by its
 * opId; an upsert creates, updates or restores by the mark's own id; a stale baseVersion
 * is a conflict answered with the server's copy. One transaction: all or nothing on error.
 */
export async function syncMarks(user: CurrentUser, readId: number, changes: SyncChangeInput[]): Promise<SendResult<ScoringMark | CandidateSkip>> {
  const marks = changes.filter((c): c is ChangeInput => c.entity !== 'skip');
  const skips = changes.filter((c): c is SkipChangeInput => c.entity === 'skip');
  // A duplicate key (the same new mark arriving twice at once, from a retry or a second tab)
  // or a deadlock is retried: the batch is idempotent, so the retry acknowledges what the other stored.
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction(async (trx) => {
        const result = marks.length || !skips.length ? await applyChanges(trx, user, readId, marks) : { acked: [], conflicts: [], rejected: [] };
        if (!skips.length) return result;
        // Skipped candidates ride the same request and transaction (db/queries/candidate-skips.ts).
        const read = checkWritable(await trx('reads').where({ id: readId }).forShare().first(), user);
        const s = await applySkipChanges(trx, user, read, skips);
        return { acked: [...result.acked, ...s.acked], conflicts: [...(result.conflicts ?? []), ...s.conflicts], rejected: [...(result.rejected ?? []), ...s.rejected] };
      });
    } catch (err) {
      const code = (err as { code?: string }).code;
      if ((code !== 'ER_LOCK_DEADLOCK' && code !== 'ER_DUP_ENTRY') || attempt >= 4) throw err;
    }
  }
}

/*
 * Round trips are what a save costs, so a batch takes a fixed handful whatever its size:
 *   1. the read, under a shared lock (saves run side by side; submitting takes the exclusive
 *      lock and waits for them), joined with the images the batch names;
 *   2. the marks the batch names, as a plain read — no lock on ids that do not exist yet, so
 *      concurrent creates take no gap locks and cannot deadlock;
 *   3. only when some of those marks exist: the same rows again under an update lock (their
 *      latest versions), and the change ids already applied to them;
 *   4. one INSERT of the new marks, and one INSERT … ON DUPLICATE KEY UPDATE with the
 *      final state of the changed ones (locked in step 3);
 *   5. one INSERT of the applied change ids.
 * A change whose mark does not exist cannot have been applied before (marks are never
 * removed, only flagged deleted), and a mark remembers its last change id, so the common
 * retry is recognised without looking it up.
 */
async function applyChanges(trx: Knex.Transaction, user: CurrentUser, readId: number, changes: ChangeInput[]): Promise<SendResult> {
  const imageIds = [...new Set(changes.flatMap((c) => (c.kind === 'upsert' && c.payload ? [c.payload.imageId] : [])))];
  const readQ = trx('reads as r').where('r.id', readId).forShare();
  if (imageIds.length) {
    readQ
      .leftJoin('field_images as fi', function () {
        this.on('fi.collection_id', 'r.collection_id').andOnIn('fi.id', imageIds);
      })
      .select('r.*', 'fi.id as fi_id', 'fi.width as fi_width', 'fi.height as fi_height');
  } else readQ.select('r.*');
  const readRows = await readQ;
  const read = checkWritable(readRows[0], user);
  const images = new Map<number, ImageBox>(readRows.filter((r) => r.fi_id != null).map((r) => [r.fi_id, { id: r.fi_id, width: r.fi_width, height: r.fi_height }]));
  const classes = new Map(json<ClassSet>(read.class_set_snapshot).classes.map((c) => [c.key, c]));

  const ids = [...new Set(changes.map((c) => c.markId))];
  const done = new Map<string, number>();
  const existing = await trx('marks').whereIn('id', ids).select('id');
  const locked = existing.length ? await trx('marks').whereIn('id', existing.map((m) => m.id)).forUpdate() : [];
  // The marks as they are now, updated as the batch applies; the locked ones existed before it.
  const rows = new Map<string, Row>(locked.map((m) => [m.id, m]));
  const lockedIds = new Set(rows.keys());
  if (locked.length) {
    for (const c of changes) {
      const r = rows.get(c.markId);
      if (r && r.last_op_id === c.opId) done.set(c.opId, r.version);
    }
    const maybeApplied = changes.filter((c) => rows.has(c.markId) && !done.has(c.opId)).map((c) => c.opId);
    if (maybeApplied.length) for (const o of await trx('mark_ops').whereIn('op_id', maybeApplied).select('op_id', 'version')) done.set(o.op_id, o.version);
  }

  const result: Required<SendResult> = { acked: [], conflicts: [], rejected: [] };
  const touched = new Set<string>();
  const applied: { op_id: string; mark_id: string; read_id: number; version: number }[] = [];
  for (const c of changes) {
    if (done.has(c.opId)) {
      result.acked.push({ opId: c.opId, markId: c.markId, version: done.get(c.opId) });
      continue;
    }
    const row = rows.get(c.markId);
    if (row && row.read_id !== readId) {
      result.rejected.push({ opId: c.opId, markId: c.markId, message: 'This mark belongs to another read.' });
      continue;
    }
    if (row && c.baseVersion !== undefined && c.baseVersion !== row.version) {
      result.conflicts.push({ opId: c.opId, markId: c.markId, server: row.deleted ? null : toMark(row) });
      continue;
    }
    let version: number;
    if (c.kind === 'delete') {
      // Deleting a mark the server never had, or has deleted already, changes nothing.
      if (!row || row.deleted) {
        result.acked.push({ opId: c.opId, markId: c.markId, version: row?.version ?? 0 });
        continue;
      }
      version = row.version + 1;
      rows.set(c.markId, { ...row, deleted: true, version, last_op_id: c.opId, updated_by: user.id });
    } else {
      const problem = checkMark(c, images, classes);
      if (problem) {
        result.rejected.push({ opId: c.opId, markId: c.markId, message: problem });
        continue;
      }
      const p = c.payload!;
      version = row ? row.version + 1 : 1;
      rows.set(c.markId, {
        ...(row ?? { id: c.markId, read_id: readId }),
        image_id: p.imageId,
        x: Math.round(p.x * 100) / 100,
        y: Math.round(p.y * 100) / 100,
        class_key: p.classKey,
        tags: JSON.stringify([...new Set(p.tags)]),
        deleted: false,
        version,
        last_op_id: c.opId,
        updated_by: user.id,
      });
    }
    touched.add(c.markId);
    applied.push({ op_id: c.opId, mark_id: c.markId, read_id: readId, version });
    done.set(c.opId, version);
    result.acked.push({ opId: c.opId, markId: c.markId, version });
  }

  if (touched.size) {
    const now = trx.fn.now(3);
    const values = (ids: string[]) =>
      ids.map((id) => {
        const r = rows.get(id)!;
        return {
          id,
          read_id: r.read_id,
          image_id: r.image_id,
          x: r.x,
          y: r.y,
          class_key: r.class_key,
          tags: typeof r.tags === 'string' ? r.tags : JSON.stringify(r.tags),
          version: r.version,
          deleted: Boolean(r.deleted),
          last_op_id: r.last_op_id,
          updated_by: r.updated_by,
          updated_at: now,
        };
      });
    // New marks by a plain INSERT: if another request created the same id meanwhile, the
    // duplicate key sends this batch round again, to be applied on top of it.
    const created = [...touched].filter((id) => !lockedIds.has(id));
    const updated = [...touched].filter((id) => lockedIds.has(id));
    if (created.length) await trx('marks').insert(values(created));
    if (updated.length) await trx('marks').insert(values(updated)).onConflict('id').merge([...MARK_COLUMNS]);
    await trx('mark_ops').insert(applied);
  }
  return result;
}
