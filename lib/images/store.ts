/**
 * Stores one uploaded field image: checks it by content, makes the browser copies,
 * puts the original untouched and both copies in object storage, then records the row.
 * Nothing is half-stored: objects put before a failure are removed, and no row is
 * written unless every object is in place. Takes its database and storage as arguments
 * so the demo seed and the upload route share it.
 */
import { createReadStream } from 'node:fs';
import type { Readable } from 'node:stream';
import type { Knex } from 'knex';
import { enqueueDetection } from '../candidates/jobs';
import { wakeWorker } from '../workers/wake';
import { ingestImage } from './ingest';
import { sanitizeFileName, type ImageLimits } from './inspect';

export type ObjectStore = {
  put: (key: string, body: Buffer | Readable, contentType: string) => Promise<void>;
  remove: (key: string) => Promise<void>;
};

export type StoreImageInput = {
  collectionId: number;
  /** The upload, already streamed to a temporary file. */
  filePath: string;
  fileName: string;
  uploadedBy: number;
  micronsPerPixel?: number | null;
  magnification?: number | null;
  optics?: 'bright_field' | 'dic' | 'phase_contrast' | null;
};

export type StoredImage = { id: number; duplicate: boolean };
export type StoreImageResult = ({ ok: true } & StoredImage) | { ok: false; code: string; message: string };

const CONTENT_TYPES: Record<string, string> = { jpeg: 'image/jpeg', png: 'image/png', tiff: 'image/tiff', webp: 'image/webp' };
const EXT: Record<string, string> = { jpeg: 'jpg', png: 'png', tiff: 'tif', webp: 'webp' };

export async function storeFieldImage(db: Knex, store: ObjectStore, input: StoreImageInput, limits: ImageLimits): Promise<StoreImageResult> {
  const ingested = await ingestImage(input.filePath, limits);
  if (!ingested.ok) return ingested;
  const { info, sha256 } = ingested;

  const existing = await db('field_images').where({ collection_id: input.collectionId, sha256 }).first('id');
  if (existing) return { ok: true, id: existing.id, duplicate: true };

  // Keys carry a random part so a concurrent upload of the same file never shares objects with us.
  const base = `collections/${input.collectionId}/images/${sha256.slice(0, 16)}-${crypto.randomUUID().slice(0, 8)}`;
  const keys = { original: `${base}/original.${EXT[info.format]}`, display: `${base}/display.jpg`, thumb: `${base}/thumb.jpg` };
  const put: string[] = [];
  const cleanUp = async () => {
    await Promise.allSettled(put.map((k) => store.remove(k)));
  };
  try {
    await store.put(keys.original, createReadStream(input.filePath), CONTENT_TYPES[info.format]);
    put.push(keys.original);
    await store.put(keys.display, ingested.display.buffer, ingested.display.contentType);
    put.push(keys.display);
    await store.put(keys.thumb, ingested.thumbnail.buffer, ingested.thumbnail.contentType);
    put.push(keys.thumb);
  } catch (err) {
    await cleanUp();
    throw new ObjectStoreError(err);
  }

  try {
    const id = await db.transaction(async (trx) => {
      const [{ next }] = await trx('field_images').where({ collection_id: input.collectionId }).max({ next: 'position' });
      const row = {
        collection_id: input.collectionId,
        position: (next ?? 0) + 1,
        file_name: sanitizeFileName(input.fileName),
        format: info.format,
        bytes: info.bytes,
        width: info.width,
        height: info.height,
        bit_depth: info.bitDepth,
        sha256,
        original_key: keys.original,
        display_key: keys.display,
        thumb_key: keys.thumb,
        display_width: ingested.display.width,
        display_height: ingested.display.height,
        microns_per_pixel: input.micronsPerPixel ?? null,
        magnification: input.magnification ?? null,
        optics: input.optics ?? null,
        uploaded_by: input.uploadedBy,
      };
      const [id] = await trx('field_images').insert(row);
      await trx('audit_log').insert({ user_id: input.uploadedBy, action: 'create', entity: 'field_image', entity_id: String(id), after: JSON.stringify({ ...row, sha256 }) });
      // Candidate detection runs later on any instance; the upload only queues it, with the row.
      await enqueueDetection(trx, id);
      return id as number;
    });
    wakeWorker('candidates');
    return { ok: true, id, duplicate: false };
  } catch (err) {
    await cleanUp();
    // Two uploads of the same file at once: the other one won; ours is the duplicate.
    if ((err as { code?: string }).code === 'ER_DUP_ENTRY') {
      const row = await db('field_images').where({ collection_id: input.collectionId, sha256 }).first('id');
      if (row) return { ok: true, id: row.id, duplicate: true };
    }
    throw err;
  }
}

export class ObjectStoreError extends Error {
  constructor(cause: unknown) {
    super('The object store refused the file', { cause });
  }
}
