import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { getLabSettings } from '@/db/queries/settings';
import { ApiError, conflict, forbidden, notFound } from '@/lib/api/errors';
import { READER_ROLES } from '@/lib/auth/roles';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet, MarkClass } from '@/lib/class-sets/schema';
import { wilsonInterval } from '@/lib/morphology/wilson';
import type { ScoringMark } from '@/lib/scoring/types';
import type { SendResult } from '@/lib/scoring/queue';
import type { ChangeInput } from '@/lib/validations/mark';

export type ReadSummary = { id: number; collectionId: number; kind: 'first' | 'second' | 'settled'; status: 'open' | 'submitted'; readerId: number; readerName: string; targetCells: number };
export type ReadDetail = ReadSummary & { stallion: string; collectedAt: string; classSet: ClassSet; canEdit: boolean };
export type FieldImageRef = { id: string; fileName: string; width: number; height: number; micronsPerPixel: number | null; position: number; displayUrl: string; thumbUrl: string };

const json = <T,>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;

function toSummary(r: Record<string, any>): ReadSummary {
  return { id: r.id, collectionId: r.collection_id, kind: r.kind, status: r.status, readerId: r.reader_id, readerName: r.reader_name, targetCells: r.target_cells };
}

function readQuery(k: Knex | Knex.Transaction = db) {
  return k('reads as r').join('users as u', 'u.id', 'r.reader_id').select('r.*', 'u.name as reader_name');
}

export async function listReads(collectionId: number): Promise<ReadSummary[]> {
  return (await readQuery().where('r.collection_id', collectionId).orderBy('r.id')).map(toSummary);
}

/** Starts the first read of a collection, or returns it when it exists (whoever's it is). */
export async function startFirstRead(user: CurrentUser, collectionId: number): Promise<{ read: ReadSummary; created: boolean }> {
  if (!READER_ROLES.includes(user.role)) throw forbidden('Only technicians and veterinarians read slides.');
  const settings = await getLabSettings();
  return db.transaction(async (trx) => {
    const collection = await trx('collections').where({ id: collectionId }).forUpdate().first('id');
    if (!collection) throw notFound('The collection');
    const existing = await readQuery(trx).where({ 'r.collection_id': collectionId, 'r.kind': 'first' }).first();
    if (existing) return { read: toSummary(existing), created: false };
    const set = await trx('class_sets').where({ is_default: true }).first();
    if (!set) throw conflict('No default class set is defined; ask the lab manager to set one.');
    const [id] = await trx('reads').insert({
      collection_id: collectionId,
      kind: 'first',
      reader_id: user.id,
      class_set_id: set.id,
      class_set_snapshot: JSON.stringify({ name: set.name, classes: json<MarkClass[]>(set.classes) }),
      target_cells: settings.targetCells,
      status: 'open',
    });
    await writeAudit(trx, { userId: user.id, action: 'create', entity: 'read', entityId: id, after: { collectionId, kind: 'first', classSet: set.name } });
    return { read: toSummary(await readQuery(trx).where('r.id', id).first()), created: true };
  });
}

function toMark(r: Record<string, any>): ScoringMark {
  return { id: r.id, imageId: String(r.image_id), x: Number(r.x), y: Number(r.y), classKey: r.class_key, tags: json<string[]>(r.tags), version: r.version };
}

export async function getReadDetail(user: CurrentUser, readId: number): Promise<{ read: ReadDetail; images: FieldImageRef[]; marks: ScoringMark[] }> {
  const r = await readQuery()
    .join('collections as k', 'k.id', 'r.collection_id')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .where('r.id', readId)
    .first('s.name as stallion', 'k.collected_at');
  if (!r) throw notFound('The read');
  // Blind second reads: only the reader sees their marks until both reads are submitted.
  if (r.kind === 'second' && r.reader_id !== user.id && r.status !== 'submitted') throw forbidden('A second read is blind until it is submitted.');
  const [images, marks] = await Promise.all([
    db('field_images').where({ collection_id: r.collection_id }).orderBy('position'),
    db('marks').where({ read_id: readId, deleted: false }).orderBy('created_at'),
  ]);
  return {
    read: {
      ...toSummary(r),
      stallion: r.stallion,
      collectedAt: new Date(r.collected_at).toISOString(),
      classSet: json<ClassSet>(r.class_set_snapshot),
      canEdit: r.reader_id === user.id && r.status === 'open',
    },
    images: images.map((i) => ({
      id: String(i.id),
      fileName: i.file_name,
      width: i.width,
      height: i.height,
      micronsPerPixel: i.microns_per_pixel,
      position: i.position,
      displayUrl: `/api/images/${i.id}/display`,
      thumbUrl: `/api/images/${i.id}/thumb`,
    })),
    marks: marks.map(toMark),
  };
}

/** The read's owner and status checks, shared by mark saves and submitting. */
function checkWritable(read: Record<string, any> | undefined, user: CurrentUser) {
  if (!read) throw notFound('The read');
  if (read.reader_id !== user.id) throw forbidden('Only the reader who started this read can change its marks.');
  if (read.status !== 'open') throw conflict('This read has been submitted and is locked.');
  return read;
}

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
const MARK_COLUMNS = ['image_id', 'x', 'y', 'class_key', 'tags', 'counts_as_sperm', 'is_normal', 'version', 'deleted', 'last_op_id', 'updated_by', 'updated_at'] as const;

/**
 * Applies a batch of mark changes made in the browser. Each change is idempotent by its
 * opId; an upsert creates, updates or restores by the mark's own id; a stale baseVersion
 * is a conflict answered with the server's copy. One transaction: all or nothing on error.
 */
export async function syncMarks(user: CurrentUser, readId: number, changes: ChangeInput[]): Promise<SendResult> {
  // A duplicate key (the same new mark arriving twice at once, from a retry or a second tab)
  // or a deadlock is retried: the batch is idempotent, so the retry acknowledges what the other stored.
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction((trx) => applyChanges(trx, user, readId, changes));
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
  const rows = new Map<string, Record<string, any>>(locked.map((m) => [m.id, m]));
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
      const cls = classes.get(p.classKey)!;
      version = row ? row.version + 1 : 1;
      rows.set(c.markId, {
        ...(row ?? { id: c.markId, read_id: readId }),
        image_id: p.imageId,
        x: Math.round(p.x * 100) / 100,
        y: Math.round(p.y * 100) / 100,
        class_key: p.classKey,
        tags: JSON.stringify([...new Set(p.tags)]),
        counts_as_sperm: cls.countsAsSperm,
        is_normal: cls.group === 'normal',
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
          counts_as_sperm: Boolean(r.counts_as_sperm),
          is_normal: Boolean(r.is_normal),
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

export async function submitRead(user: CurrentUser, readId: number): Promise<ReadSummary> {
  return db.transaction(async (trx) => {
    const read = checkWritable(await trx('reads').where({ id: readId }).forUpdate().first(), user);
    const n = await trx('marks').where({ read_id: readId, deleted: false }).count({ n: '*' }).first();
    if (Number(n?.n ?? 0) === 0) throw new ApiError(422, 'empty_read', 'Mark at least one cell before submitting the read.');
    await trx('reads').where({ id: readId }).update({ status: 'submitted', submitted_at: trx.fn.now(3) });
    await writeAudit(trx, { userId: user.id, action: 'submit', entity: 'read', entityId: readId, before: { status: read.status }, after: { status: 'submitted', marks: Number(n?.n) } });
    return toSummary(await readQuery(trx).where('r.id', readId).first());
  });
}

export type ReadTotals = {
  readId: number; kind: ReadSummary['kind']; status: ReadSummary['status']; readerId: number; readerName: string;
  cellsCounted: number; nonSperm: number; normal: number; pctNormal: number | null;
  wilson: { lower: number; upper: number } | null; target: number; targetReached: boolean;
  perClass: { classKey: string; name: string; count: number; pct: number | null }[];
};

/** Totals of every read of a collection, from one grouped query (indexed by read, deleted, class). */
export async function morphologyForCollection(collectionId: number): Promise<ReadTotals[]> {
  const rows = (await db('reads as r')
    .join('users as u', 'u.id', 'r.reader_id')
    .leftJoin('marks as m', function () {
      this.on('m.read_id', 'r.id').andOn('m.deleted', db.raw('0'));
    })
    .where('r.collection_id', collectionId)
    .groupBy('r.id', 'm.class_key')
    .orderBy('r.id')
    .select('r.id', 'r.kind', 'r.status', 'r.reader_id', 'r.target_cells', 'r.class_set_snapshot', 'u.name as reader_name', 'm.class_key')
    .count({ n: 'm.id' })) as Record<string, any>[];
  const byRead = new Map<number, Record<string, any>[]>();
  for (const r of rows) byRead.set(r.id, [...(byRead.get(r.id) ?? []), r]);
  return [...byRead.values()].map((group) => {
    const first = group[0] as Record<string, any>;
    const set = json<ClassSet>(first.class_set_snapshot);
    const counts = new Map(group.filter((g) => g.class_key).map((g) => [g.class_key as string, Number(g.n)]));
    let cells = 0, normal = 0, nonSperm = 0;
    for (const c of set.classes) {
      const n = counts.get(c.key) ?? 0;
      if (!c.countsAsSperm) nonSperm += n;
      else {
        cells += n;
        if (c.group === 'normal') normal += n;
      }
    }
    const w = wilsonInterval(normal, cells);
    return {
      readId: first.id,
      kind: first.kind,
      status: first.status,
      readerId: first.reader_id,
      readerName: first.reader_name,
      cellsCounted: cells,
      nonSperm,
      normal,
      pctNormal: cells ? (normal / cells) * 100 : null,
      wilson: w ? { lower: w.lower * 100, upper: w.upper * 100 } : null,
      target: first.target_cells,
      targetReached: cells >= first.target_cells,
      perClass: set.classes.map((c) => ({ classKey: c.key, name: c.name, count: counts.get(c.key) ?? 0, pct: c.countsAsSperm && cells ? ((counts.get(c.key) ?? 0) / cells) * 100 : null })),
    };
  });
}
