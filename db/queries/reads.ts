import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { readWalkData } from '@/db/queries/candidates';
import { getLabSettings } from '@/db/queries/settings';
import { json, type Row } from '@/db/row';
import { ApiError, conflict, forbidden, notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet, MarkClass } from '@/lib/class-sets/schema';
import { FIRST_READ, OPEN, SUBMITTED, type ReadKind, type ReadStatus } from '@/lib/reads/kinds';
import { mayEditMarks, mayRead, mayViewMarks, whyNotStart } from '@/lib/reads/policy';
import type { FieldImageRef, ReadPayload, ScoringMark } from '@/lib/scoring/types';

/*
 * The read's lifecycle: start, open on the scoring page, submit. Mark saves are in
 * db/queries/mark-sync.ts and the totals in db/queries/morphology.ts.
 */

export type ReadSummary = { id: number; collectionId: number; kind: ReadKind; status: ReadStatus; readerId: number; readerName: string; targetCells: number };

function toSummary(r: Row): ReadSummary {
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
  if (!mayRead(user.role)) throw forbidden('Only technicians and veterinarians read slides.');
  const settings = await getLabSettings();
  return db.transaction(async (trx) => {
    const collection = await trx('collections').where({ id: collectionId }).forUpdate().first('id');
    if (!collection) throw notFound('The collection');
    const existing = await readQuery(trx).where({ 'r.collection_id': collectionId, 'r.kind': FIRST_READ }).first();
    if (existing) return { read: toSummary(existing), created: false };
    const refused = whyNotStart(user, FIRST_READ, []);
    if (refused) throw forbidden(refused);
    const set = await trx('class_sets').where({ is_default: true }).first();
    if (!set) throw conflict('No default class set is defined; ask the lab manager to set one.');
    const [id] = await trx('reads').insert({
      collection_id: collectionId,
      kind: FIRST_READ,
      reader_id: user.id,
      class_set_id: set.id,
      class_set_snapshot: JSON.stringify({ name: set.name, classes: json<MarkClass[]>(set.classes) }),
      target_cells: settings.targetCells,
      status: OPEN,
    });
    await writeAudit(trx, { userId: user.id, action: 'create', entity: 'read', entityId: id, after: { collectionId, kind: FIRST_READ, classSet: set.name } });
    return { read: toSummary(await readQuery(trx).where('r.id', id).first()), created: true };
  });
}

export function toMark(r: Row): ScoringMark {
  return { id: r.id, imageId: String(r.image_id), x: Number(r.x), y: Number(r.y), classKey: r.class_key, tags: json<string[]>(r.tags), version: r.version };
}

export async function getReadDetail(user: CurrentUser, readId: number): Promise<ReadPayload> {
  const r = await readQuery()
    .join('collections as k', 'k.id', 'r.collection_id')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .where('r.id', readId)
    .first('s.name as stallion', 'k.collected_at');
  if (!r) throw notFound('The read');
  const summary = toSummary(r);
  if (!mayViewMarks(user, summary)) throw forbidden('A second read is blind until it is submitted.');
  const [images, marks] = await Promise.all([
    db('field_images').where({ collection_id: r.collection_id }).orderBy('position'),
    db('marks').where({ read_id: readId, deleted: false }).orderBy('created_at'),
  ]);
  const walk = await readWalkData(user, summary, images.map((i) => i.id));
  return {
    read: {
      ...summary,
      stallion: r.stallion,
      collectedAt: new Date(r.collected_at).toISOString(),
      classSet: json<ClassSet>(r.class_set_snapshot),
      canEdit: mayEditMarks(user, summary),
    },
    images: images.map(
      (i): FieldImageRef => ({
        id: String(i.id),
        fileName: i.file_name,
        width: i.width,
        height: i.height,
        micronsPerPixel: i.microns_per_pixel,
        position: i.position,
        displayUrl: `/api/images/${i.id}/display`,
        thumbUrl: `/api/images/${i.id}/thumb`,
      }),
    ),
    marks: marks.map(toMark),
    ...walk,
  };
}

/** The read's owner and status checks, shared by mark saves and submitting. */
export function checkWritable(read: Row | undefined, user: CurrentUser): Row {
  if (!read) throw notFound('The read');
  if (read.reader_id !== user.id) throw forbidden('Only the reader who started this read can change its marks.');
  if (read.status !== OPEN) throw conflict('This read has been submitted and is locked.');
  return read;
}

export async function submitRead(user: CurrentUser, readId: number): Promise<ReadSummary> {
  return db.transaction(async (trx) => {
    const read = checkWritable(await trx('reads').where({ id: readId }).forUpdate().first(), user);
    const n = await trx('marks').where({ read_id: readId, deleted: false }).count({ n: '*' }).first();
    if (Number(n?.n ?? 0) === 0) throw new ApiError(422, 'empty_read', 'Mark at least one cell before submitting the read.');
    await trx('reads').where({ id: readId }).update({ status: SUBMITTED, submitted_at: trx.fn.now(3) });
    await writeAudit(trx, { userId: user.id, action: 'submit', entity: 'read', entityId: readId, before: { status: read.status }, after: { status: SUBMITTED, marks: Number(n?.n) } });
    return toSummary(await readQuery(trx).where('r.id', readId).first());
  });
}
