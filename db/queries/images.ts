import 'server-only';
import { requireRecord } from '@/db/queries/records';
import { createWriteStream } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable, Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { ApiError, conflict, notFound } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import { UPLOAD_LIMITS } from '@/lib/images/limits';
import { ObjectStoreError, storeFieldImage, type StoreImageInput } from '@/lib/images/store';
import * as storage from '@/storage/s3';
import type { Row } from '@/db/row';
import { READ_KINDS, type ReadKind, type ReadStatus } from '@/lib/reads/kinds';
import { visibleReads } from '@/lib/reads/policy';
import { parseParams } from '@/lib/candidates/jobs';
import { skippedText } from '@/lib/candidates/skipped';
import type { Knex } from 'knex';

export type FieldImage = {
  id: number;
  collectionId: number;
  position: number;
  fileName: string;
  format: string;
  bytes: number;
  width: number;
  height: number;
  bitDepth: number;
  sha256: string;
  micronsPerPixel: number | null;
  magnification: number | null;
  optics: string | null;
  uploadedBy: string;
  createdAt: string;
  /**
   * Cells marked on this image in each kind of read the viewer may see (live marks; the latest
   * such read of each kind; lib/reads/policy.ts visibleReads decides, so a blind second reader
   * sees only their own read's count).
   */
  marks: Record<ReadKind, number>;
  /** Some read, seen by the viewer or not, has cells marked here: the image can be neither deleted nor rescaled. */
  marked: boolean;
  /**
   * The search for candidate cells: its state, how many were found, why it failed, and why a
   * done search gave none on purpose (scale too coarse, an implausible result; lib/candidates/skipped.ts).
   */
  candidates: { status: 'waiting' | 'running' | 'done' | 'failed'; count: number; error: string | null; skipped: string | null };
  thumbUrl: string;
  displayUrl: string;
};

function toImage(r: Row, marks: Record<ReadKind, number>, marked: boolean): FieldImage {
  return {
    id: r.id,
    collectionId: r.collection_id,
    position: r.position,
    fileName: r.file_name,
    format: r.format,
    bytes: Number(r.bytes),
    width: r.width,
    height: r.height,
    bitDepth: r.bit_depth,
    sha256: r.sha256,
    micronsPerPixel: r.microns_per_pixel,
    magnification: r.magnification,
    optics: r.optics,
    uploadedBy: r.uploaded_by_name,
    createdAt: new Date(r.created_at).toISOString(),
    marks,
    marked,
    candidates: {
      status: r.candidate_status ?? 'failed',
      count: Number(r.candidate_count ?? 0),
      error: r.candidate_status ? (r.candidate_error ?? null) : 'Finding cells was never queued for this image.',
      skipped: r.candidate_status === 'done' ? skippedText(parseParams(r.candidate_params)) : null,
    },
    thumbUrl: `/api/images/${r.id}/thumb`,
    displayUrl: `/api/images/${r.id}/display`,
  };
}

export async function listImages(actor: CurrentUser, collectionId: number): Promise<FieldImage[]> {
  const [rows, reads, counts] = await Promise.all([
    db('field_images as i')
      .join('users as u', 'u.id', 'i.uploaded_by')
      .leftJoin('candidate_jobs as j', 'j.image_id', 'i.id')
      .where('i.collection_id', collectionId)
      .orderBy('i.position')
      .select('i.*', 'u.name as uploaded_by_name', 'j.status as candidate_status', 'j.error as candidate_error', 'j.params as candidate_params')
      .select(db.raw('(select count(*) from candidates c where c.image_id = i.id) as candidate_count')),
    db('reads').where({ collection_id: collectionId }).orderBy('id').select('id', 'kind', 'status', 'reader_id') as Promise<Row[]>,
    // Live marks per image and read, in one grouped query on the (image_id, read_id) index.
    db('marks as m')
      .join('field_images as i', 'i.id', 'm.image_id')
      .where('i.collection_id', collectionId)
      .where('m.deleted', false)
      .groupBy('m.image_id', 'm.read_id')
      .select('m.image_id', 'm.read_id')
      .count({ n: '*' }) as Promise<Row[]>,
  ]);
  const refs = reads.map((r) => ({ id: r.id as number, kind: r.kind as ReadKind, status: r.status as ReadStatus, readerId: r.reader_id as number }));
  // The latest visible read of each kind is the one counted.
  const shown = new Map<number, ReadKind>();
  for (const kind of READ_KINDS) {
    const latest = visibleReads(actor, refs).filter((r) => r.kind === kind).at(-1);
    if (latest) shown.set(latest.id, kind);
  }
  const none = () => Object.fromEntries(READ_KINDS.map((k) => [k, 0])) as Record<ReadKind, number>;
  const byImage = new Map<number, Record<ReadKind, number>>();
  const marked = new Set<number>();
  for (const c of counts) {
    if (Number(c.n) > 0) marked.add(c.image_id);
    const kind = shown.get(c.read_id);
    if (!kind) continue;
    const marks = byImage.get(c.image_id) ?? none();
    marks[kind] = Number(c.n);
    byImage.set(c.image_id, marks);
  }
  return rows.map((r) => toImage(r, byImage.get(r.id) ?? none(), marked.has(r.id)));
}

/**
 * Refuses a change of scale on images with cells marked in any read (409): the pairing of two
 * reads turns the lab's distance in µm into pixels with it, and the figures would move. Setting
 * the scale an image already has changes nothing and passes.
 */
async function refuseRescaleOfMarked(trx: Knex.Transaction, images: Row[], micronsPerPixel: number | null): Promise<void> {
  const changing = images.filter((i) => (i.microns_per_pixel == null ? null : Number(i.microns_per_pixel)) !== micronsPerPixel);
  if (changing.length === 0) return;
  const marked: Row[] = await trx('marks').whereIn('image_id', changing.map((i) => i.id)).where('deleted', false).distinct('image_id');
  if (marked.length === 0) return;
  const names = changing.filter((i) => marked.some((m) => m.image_id === i.id)).map((i) => i.file_name);
  throw new ApiError(
    409,
    'scale_locked',
    `The scale of ${names.length === 1 ? names[0] : `${names.length} images (${names.slice(0, 3).join(', ')}${names.length > 3 ? ' …' : ''})`} cannot change: cells are marked on ${names.length === 1 ? 'it' : 'them'} in a read, and the pairing of two reads measures distances with the scale. Set the scale before anyone marks cells.`,
  );
}

export async function getImageRow(id: number) {
  const row = await db('field_images').where({ id }).first();
  if (!row) throw notFound('The field image');
  return row;
}

/** Streams the request body to a temporary file, refusing it once it passes the size limit. */
async function bodyToTempFile(body: ReadableStream<Uint8Array> | null, maxBytes: number, name: string): Promise<{ dir: string; path: string; bytes: number }> {
  if (!body) throw new ApiError(422, 'empty', `${name}: the file is empty (0 bytes).`);
  const dir = await mkdtemp(join(tmpdir(), 'fieldmark-upload-'));
  const path = join(dir, 'upload');
  let bytes = 0;
  const tooLarge = () => new ApiError(413, 'too_large', `${name}: the file is larger than the ${Math.round(maxBytes / 1048576)} MB limit.`);
  // Past the limit the rest is read and dropped rather than the stream cancelled: a cancelled
  // request body leaves the connection stalled, and the client's next request on it would hang.
  // Only a body far past the limit (4 ×) is cut off.
  const limiter = new Transform({
    transform(chunk: Buffer, _enc, done) {
      bytes += chunk.length;
      if (bytes > 4 * maxBytes) done(tooLarge());
      else done(null, bytes > maxBytes ? undefined : chunk);
    },
  });
  try {
    await pipeline(Readable.fromWeb(body as import('node:stream/web').ReadableStream), limiter, createWriteStream(path));
  } catch (err) {
    await rm(dir, { recursive: true, force: true });
    if (err instanceof ApiError) throw err;
    throw new ApiError(400, 'upload_interrupted', `${name}: the upload was interrupted before the whole file arrived. Try again.`);
  }
  if (bytes > maxBytes) {
    await rm(dir, { recursive: true, force: true });
    throw tooLarge();
  }
  return { dir, path, bytes };
}

export async function uploadImage(
  actor: CurrentUser,
  collectionId: number,
  body: ReadableStream<Uint8Array> | null,
  meta: Omit<StoreImageInput, 'collectionId' | 'filePath' | 'uploadedBy'>,
): Promise<{ image: FieldImage; duplicate: boolean }> {
  await requireRecord('collections', collectionId);
  const tmp = await bodyToTempFile(body, UPLOAD_LIMITS.maxBytes, meta.fileName);
  try {
    const r = await storeFieldImage(db, storage, { ...meta, collectionId, filePath: tmp.path, uploadedBy: actor.id }, UPLOAD_LIMITS);
    if (!r.ok) {
      const status = r.code === 'too_large' ? 413 : r.code === 'unsupported_format' || r.code === 'not_an_image' ? 415 : 422;
      throw new ApiError(status, r.code, `${meta.fileName}: ${r.message}`);
    }
    const image = (await listImages(actor, collectionId)).find((i) => i.id === r.id)!;
    return { image, duplicate: r.duplicate };
  } catch (err) {
    if (err instanceof ObjectStoreError) {
      console.error('[fieldmark] object store', err.cause);
      throw new ApiError(503, 'storage_unavailable', `${meta.fileName}: the image store is not reachable; nothing was saved. Try again shortly.`);
    }
    throw err;
  } finally {
    await rm(tmp.dir, { recursive: true, force: true });
  }
}

export async function updateImage(actor: CurrentUser, id: number, change: { move?: 'up' | 'down'; micronsPerPixel?: number | null }): Promise<void> {
  await db.transaction(async (trx) => {
    const img = await trx('field_images').where({ id }).forUpdate().first();
    if (!img) throw notFound('The field image');
    if (change.move) {
      const neighbour = await trx('field_images')
        .where('collection_id', img.collection_id)
        .where('position', change.move === 'up' ? '<' : '>', img.position)
        .orderBy('position', change.move === 'up' ? 'desc' : 'asc')
        .forUpdate()
        .first();
      if (neighbour) {
        await trx('field_images').where({ id: neighbour.id }).update({ position: img.position });
        await trx('field_images').where({ id }).update({ position: neighbour.position });
      }
    }
    if (change.micronsPerPixel !== undefined) {
      await refuseRescaleOfMarked(trx, [img], change.micronsPerPixel);
      await trx('field_images').where({ id }).update({ microns_per_pixel: change.micronsPerPixel });
    }
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'field_image', entityId: id, before: { position: img.position, micronsPerPixel: img.microns_per_pixel }, after: change });
  });
}

export async function setCollectionScale(actor: CurrentUser, collectionId: number, micronsPerPixel: number): Promise<number> {
  return db.transaction(async (trx) => {
    await requireRecord('collections', collectionId, trx);
    const images: Row[] = await trx('field_images').where({ collection_id: collectionId }).forUpdate().select('id', 'file_name', 'microns_per_pixel');
    await refuseRescaleOfMarked(trx, images, micronsPerPixel);
    const n = await trx('field_images').where({ collection_id: collectionId }).update({ microns_per_pixel: micronsPerPixel });
    await writeAudit(trx, { userId: actor.id, action: 'update', entity: 'collection_scale', entityId: collectionId, after: { micronsPerPixel, images: n } });
    return n;
  });
}

/** Refused while any read has cells marked on the image: removing it would silently change a result. */
export async function deleteImage(actor: CurrentUser, id: number): Promise<void> {
  const keys = await db.transaction(async (trx) => {
    const img = await trx('field_images').where({ id }).forUpdate().first();
    if (!img) throw notFound('The field image');
    const marked = await trx('marks').where({ image_id: id }).count({ n: '*' }).first();
    if (Number(marked?.n ?? 0) > 0) {
      throw conflict(`${img.file_name} has cells marked on it in a read; it cannot be deleted. Delete the marks first, or keep the image.`);
    }
    // Skipped candidates of the cell walk count for nothing: they go with the image.
    await trx('candidate_skips').where({ image_id: id }).delete();
    await trx('field_images').where({ id }).delete();
    await writeAudit(trx, { userId: actor.id, action: 'delete', entity: 'field_image', entityId: id, before: img });
    return [img.original_key, img.display_key, img.thumb_key] as string[];
  });
  // After the row is gone; an object left by a failed removal is unreachable, never a dangling row.
  await Promise.allSettled(keys.map((k) => storage.remove(k)));
}
