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

/**
 * Checks the read is open and the user's, holding a shared lock: mark saves run side by side,
 * while submitting (which takes the exclusive lock) waits for them and they wait for it.
 */
async function writableRead(trx: Knex.Transaction, user: CurrentUser, readId: number, lock: 'share' | 'update' = 'share') {
  const q = trx('reads').where({ id: readId });
  const read = await (lock === 'share' ? q.forShare() : q.forUpdate()).first();
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

/**
 * Applies a batch of mark changes made in the browser. Each change is idempotent by its
 * opId; an upsert creates, updates or restores by the mark's own id; a stale baseVersion
 * is a conflict answered with the server's copy. One transaction: all or nothing on error.
 */
export async function syncMarks(user: CurrentUser, readId: number, changes: ChangeInput[]): Promise<SendResult> {
  // Read committed: locking a not-yet-existing mark id takes no gap lock, so concurrent
  // creates do not deadlock. A deadlock, or a duplicate key from the same change arriving twice
  // at once, is retried: the batch is idempotent, so the retry acknowledges what the other stored.
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction((trx) => applyChanges(trx, user, readId, changes), { isolationLevel: 'read committed' });
    } catch (err) {
      const code = (err as { code?: string }).code;
      if ((code !== 'ER_LOCK_DEADLOCK' && code !== 'ER_DUP_ENTRY') || attempt >= 4) throw err;
    }
  }
}

async function applyChanges(trx: Knex.Transaction, user: CurrentUser, readId: number, changes: ChangeInput[]): Promise<SendResult> {
  const read = await writableRead(trx, user, readId);
  const classes = new Map(json<ClassSet>(read.class_set_snapshot).classes.map((c) => [c.key, c]));
  const images = new Map<number, ImageBox>(
    (await trx('field_images').where({ collection_id: read.collection_id }).select('id', 'width', 'height')).map((i) => [i.id, i]),
  );
  const result: Required<SendResult> = { acked: [], conflicts: [], rejected: [] };
  const done = new Map<string, number>(
    (await trx('mark_ops').whereIn('op_id', changes.map((c) => c.opId)).select('op_id', 'version')).map((o) => [o.op_id, o.version]),
  );
  const ids = [...new Set(changes.map((c) => c.markId))];
  const rows = new Map<string, Record<string, any>>((await trx('marks').whereIn('id', ids).forUpdate()).map((m) => [m.id, m]));

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
      if (!row || row.deleted) {
        version = row?.version ?? 0;
      } else {
        version = row.version + 1;
        await trx('marks').where({ id: c.markId }).update({ deleted: true, version, last_op_id: c.opId, updated_by: user.id, updated_at: trx.fn.now(3) });
        rows.set(c.markId, { ...row, deleted: true, version });
      }
    } else {
      const problem = checkMark(c, images, classes);
      if (problem) {
        result.rejected.push({ opId: c.opId, markId: c.markId, message: problem });
        continue;
      }
      const p = c.payload!;
      const cls = classes.get(p.classKey)!;
      const values = {
        image_id: p.imageId,
        x: Math.round(p.x * 100) / 100,
        y: Math.round(p.y * 100) / 100,
        class_key: p.classKey,
        tags: JSON.stringify([...new Set(p.tags)]),
        counts_as_sperm: cls.countsAsSperm,
        is_normal: cls.group === 'normal',
        deleted: false,
        last_op_id: c.opId,
        updated_by: user.id,
      };
      if (row) {
        version = row.version + 1;
        await trx('marks').where({ id: c.markId }).update({ ...values, version, updated_at: trx.fn.now(3) });
      } else {
        version = 1;
        await trx('marks').insert({ id: c.markId, read_id: readId, ...values, version });
      }
      rows.set(c.markId, { ...(row ?? { id: c.markId, read_id: readId }), ...values, version });
    }
    await trx('mark_ops').insert({ op_id: c.opId, mark_id: c.markId, read_id: readId, version });
    done.set(c.opId, version);
    result.acked.push({ opId: c.opId, markId: c.markId, version });
  }
  return result;
}

export async function submitRead(user: CurrentUser, readId: number): Promise<ReadSummary> {
  return db.transaction(async (trx) => {
    const read = await writableRead(trx, user, readId, 'update');
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
