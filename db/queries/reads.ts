import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { getLabSettings } from '@/db/queries/settings';
import { json, type Row } from '@/db/row';
import { ApiError, conflict, forbidden, notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet, MarkClass } from '@/lib/class-sets/schema';
import { pairedReads } from '@/db/queries/agreement-core';
import { FIRST_READ, OPEN, SECOND_READ, SETTLED_READ, SUBMITTED, numberReads, type ReadKind, type ReadStatus } from '@/lib/reads/kinds';
import { latestRead, mayEditMarks, mayViewRead, recountAdvised, whyNotStart } from '@/lib/reads/policy';
import type { FieldImageRef, ReadPayload, ScoringMark } from '@/lib/scoring/types';

/*
 * The read's lifecycle: start, open on the scoring page, submit. Mark saves are in
 * db/queries/mark-sync.ts and the totals in db/queries/morphology.ts.
 */

/** A read without its marks or figures; `number` is its place among the collection's reads (lib/reads/kinds.ts numberReads). */
export type ReadSummary = { id: number; collectionId: number; number: number; kind: ReadKind; status: ReadStatus; readerId: number; readerName: string; targetCells: number };

function toSummary(r: Row, numbers: Map<number, number>): ReadSummary {
  return { id: r.id, collectionId: r.collection_id, number: numbers.get(r.id) ?? 1, kind: r.kind, status: r.status, readerId: r.reader_id, readerName: r.reader_name, targetCells: r.target_cells };
}

const asRef = (r: Row) => ({ id: r.id as number, kind: r.kind as ReadKind, status: r.status as ReadStatus, readerId: r.reader_id as number });

function readQuery(k: Knex | Knex.Transaction = db) {
  return k('reads as r').join('users as u', 'u.id', 'r.reader_id').select('r.*', 'u.name as reader_name');
}

/** A collection's reads, numbered, each saying whether the actor may see its marks and figures (lib/reads/policy.ts). */
export async function listReads(actor: CurrentUser, collectionId: number): Promise<(ReadSummary & { visible: boolean })[]> {
  const rows: Row[] = await readQuery().where('r.collection_id', collectionId).orderBy('r.id');
  const numbers = numberReads(rows.map(asRef));
  const refs = rows.map(asRef);
  return rows.map((r, i) => ({ ...toSummary(r, numbers), visible: mayViewRead(actor, refs[i]!, refs) }));
}

/**
 * Starts a read of a collection (POST /api/collections/{id}/reads), under the collection's row
 * lock so two readers cannot both start one:
 * - first: returns the first read when it exists (whoever's it is), else starts it with the
 *   default class set;
 * - second: returns the actor's own open second read, else starts one when lib/reads/policy.ts
 *   whyNotStart allows it (403 or 409 with its reason), with the first read's class set so the two
 *   reads pair class for class. A recount (a further second read) needs "recount advised": the
 *   latest first and second reads differ by more than the acceptable difference.
 */
export async function startRead(user: CurrentUser, collectionId: number, kind: ReadKind): Promise<{ read: ReadSummary; created: boolean }> {
  const settings = await getLabSettings();
  return db.transaction(async (trx) => {
    const collection = await trx('collections').where({ id: collectionId }).forUpdate().first('id');
    if (!collection) throw notFound('The collection');
    const rows: Row[] = await readQuery(trx).where('r.collection_id', collectionId).orderBy('r.id');
    const refs = rows.map(asRef);
    const summary = (id: number) => readQuery(trx).where('r.collection_id', collectionId).orderBy('r.id').then((all: Row[]) => toSummary(all.find((r) => r.id === id)!, numberReads(all.map(asRef))));
    if (kind === FIRST_READ) {
      const existing = latestRead(refs, FIRST_READ);
      if (existing) return { read: await summary(existing.id), created: false };
    } else {
      const own = refs.find((r) => r.kind === kind && r.status === OPEN && r.readerId === user.id);
      if (own) return { read: await summary(own.id), created: false };
    }
    // Pairing the two reads costs a query or two: only when a recount is the question.
    const mayRecount = kind === SECOND_READ && refs.some((r) => r.kind === SECOND_READ && r.status === SUBMITTED) && !latestRead(refs, SETTLED_READ);
    const recount = mayRecount ? recountAdvised(refs, (await pairedReads(trx, collectionId, settings)).agreement?.acceptableDifference) : false;
    const refused = whyNotStart(user, kind, refs, { recountAdvised: recount });
    if (refused) throw refused.status === 403 ? forbidden(refused.message) : conflict(refused.message);

    let classSet: { id: number; snapshot: string; name: string };
    if (kind === FIRST_READ) {
      const set = await trx('class_sets').where({ is_default: true }).first();
      if (!set) throw conflict('No default class set is defined; ask the lab manager to set one.');
      classSet = { id: set.id, name: set.name, snapshot: JSON.stringify({ name: set.name, classes: json<MarkClass[]>(set.classes) }) };
    } else {
      const first = rows.find((r) => r.id === latestRead(refs, FIRST_READ)!.id)!;
      const snapshot = json<ClassSet>(first.class_set_snapshot);
      classSet = { id: first.class_set_id, name: snapshot.name, snapshot: JSON.stringify(snapshot) };
    }
    const [id] = await trx('reads').insert({
      collection_id: collectionId,
      kind,
      reader_id: user.id,
      class_set_id: classSet.id,
      class_set_snapshot: classSet.snapshot,
      target_cells: settings.targetCells,
      status: OPEN,
    });
    await writeAudit(trx, { userId: user.id, action: 'create', entity: 'read', entityId: id, after: { collectionId, kind, classSet: classSet.name, ...(recount ? { recount: true } : {}) } });
    return { read: await summary(id), created: true };
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
  const siblings: Row[] = await db('reads').where({ collection_id: r.collection_id }).orderBy('id').select('id', 'kind', 'status', 'reader_id');
  const summary = toSummary(r, numberReads(siblings.map(asRef)));
  if (!mayViewRead(user, summary, siblings.map(asRef))) {
    throw forbidden(
      siblings.some((x) => x.kind === SECOND_READ && x.status === OPEN && x.reader_id === user.id)
        ? 'Your second read of this collection is blind: the other reads open once you submit it.'
        : 'A second read is blind until it is submitted.',
    );
  }
  const [images, marks] = await Promise.all([
    db('field_images').where({ collection_id: r.collection_id }).orderBy('position'),
    db('marks').where({ read_id: readId, deleted: false }).orderBy('created_at'),
  ]);
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
    const all: Row[] = await readQuery(trx).where('r.collection_id', read.collection_id).orderBy('r.id');
    return toSummary(all.find((x) => x.id === readId)!, numberReads(all.map(asRef)));
  });
}
