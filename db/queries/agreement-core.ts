/**
 * The two reads a collection's agreement figures compare, loaded and paired once: the latest
 * submitted first read and the latest submitted second read (a recount, when there was one), their
 * live marks, and lib/agreement's figures at the lab's pairing distance. The report
 * (db/queries/report-core.ts readsForReport), GET /api/collections/{id}/agreement, the collection
 * page and the lists all come here. Takes its database as an argument and has no `server-only`,
 * because the demo seed runs it under tsx through the report code.
 */
import type { Knex } from 'knex';
import { collectionAgreement, pairCollection, type CollectionAgreement } from '@/lib/agreement/agreement';
import { PAIRING_DISTANCE_PX_DEFAULT, PAIRING_DISTANCE_UM_DEFAULT, pairingDistancePx, type PairingDistanceSettings, type PairingMark } from '@/lib/agreement/pairing';
import type { ClassSet } from '@/lib/class-sets/schema';
import { morphologyClasses } from '@/lib/morphology/engine';
import { reportReads, type ReportRead } from '@/lib/reports/readiness';
import type { LabSettings } from '@/lib/settings/lab-settings';
import { json, type Row } from '../row';

type K = Knex | Knex.Transaction;

export interface ReportReadRow extends ReportRead {
  collectionId: number;
  classSet: ClassSet;
  targetCells: number;
}

/** Every read of a collection, in the order they were started (by id). */
export async function collectionReads(k: K, collectionId: number): Promise<ReportReadRow[]> {
  const rows: Row[] = await k('reads as r')
    .join('users as u', 'u.id', 'r.reader_id')
    .where('r.collection_id', collectionId)
    .orderBy('r.id')
    .select('r.id', 'r.collection_id', 'r.kind', 'r.status', 'r.reader_id', 'r.target_cells', 'r.class_set_snapshot', 'u.name as reader_name');
  return rows.map((r) => ({
    id: r.id,
    collectionId: r.collection_id,
    kind: r.kind,
    status: r.status,
    readerId: r.reader_id,
    readerName: r.reader_name,
    targetCells: r.target_cells,
    classSet: json<ClassSet>(r.class_set_snapshot),
  }));
}

export type MarkRow = { id: string; readId: number; imageId: string; x: number; y: number; classKey: string; tags: string[] };

/** The live marks of these reads, by read. */
export async function liveMarks(k: K, readIds: number[]): Promise<Map<number, MarkRow[]>> {
  const out = new Map<number, MarkRow[]>(readIds.map((id) => [id, []]));
  if (!readIds.length) return out;
  const rows: Row[] = await k('marks').whereIn('read_id', readIds).where('deleted', false).orderBy('id').select('id', 'read_id', 'image_id', 'x', 'y', 'class_key', 'tags');
  for (const r of rows) {
    out.get(r.read_id)!.push({ id: r.id, readId: r.read_id, imageId: String(r.image_id), x: Number(r.x), y: Number(r.y), classKey: r.class_key, tags: json<string[]>(r.tags) });
  }
  return out;
}

/** The lab settings pairing needs; absent ones take the defaults (4 µm; 16 px on an image without a scale). */
export type PairingSettings = Partial<Pick<LabSettings, 'pairingDistanceUm' | 'unscaledMicronsPerPixel'>>;

/**
 * The lab's pairing distance for pairingDistancePx: the setting in µm, and on an image without a
 * scale the same distance in pixels at the lab's "pixel size for images without a scale".
 */
export function pairingDistanceOf(s: PairingSettings): Required<PairingDistanceSettings> {
  const distanceUm = s.pairingDistanceUm ?? PAIRING_DISTANCE_UM_DEFAULT;
  return { distanceUm, fallbackPx: s.unscaledMicronsPerPixel ? distanceUm / s.unscaledMicronsPerPixel : PAIRING_DISTANCE_PX_DEFAULT };
}

export interface PairedReads {
  /** The reads considered (all of the collection's, or those the caller's filter kept). */
  reads: ReportReadRow[];
  first: ReportReadRow | null;
  second: ReportReadRow | null;
  settled: ReportReadRow | null;
  /** Live marks of first, second and settled, by read id. */
  marks: Map<number, MarkRow[]>;
  /** The first and second reads' agreement; null unless both are submitted. */
  agreement: CollectionAgreement | null;
}

export interface PairedReadsOptions {
  /** Keep only these of the collection's reads (the actor's visible reads, lib/reads/policy.ts). */
  filter?: (reads: ReportReadRow[]) => ReportReadRow[];
}

/** Loads a collection's reads and pairs its latest submitted first and second reads (see the module comment). */
export async function pairedReads(k: K, collectionId: number, settings: PairingSettings, opts: PairedReadsOptions = {}): Promise<PairedReads> {
  const all = await collectionReads(k, collectionId);
  const reads = opts.filter ? opts.filter(all) : all;
  const { first, second, settled } = reportReads(reads);
  const marks = await liveMarks(k, [...new Set([first, second, settled].filter((r): r is ReportReadRow => r !== null).map((r) => r.id))]);

  let agreement: CollectionAgreement | null = null;
  if (first && second) {
    const images: Row[] = await k('field_images').where({ collection_id: collectionId }).orderBy('position').orderBy('id').select('id', 'microns_per_pixel');
    const sperm = new Map(first.classSet.classes.map((c) => [c.key, c.countsAsSperm]));
    const asPairing = (m: MarkRow): PairingMark & { imageId: string } => ({ id: m.id, x: m.x, y: m.y, classKey: m.classKey, countsAsSperm: sperm.get(m.classKey) ?? true, imageId: m.imageId });
    const a = marks.get(first.id)!.map(asPairing);
    const b = marks.get(second.id)!.map(asPairing);
    const distance = pairingDistanceOf(settings);
    const pairings = pairCollection(
      images.map((im) => ({
        imageId: String(im.id),
        first: a.filter((m) => m.imageId === String(im.id)),
        second: b.filter((m) => m.imageId === String(im.id)),
        maxDistancePx: pairingDistancePx(im.microns_per_pixel == null ? null : Number(im.microns_per_pixel), distance),
      })),
    );
    agreement = collectionAgreement(pairings, morphologyClasses(first.classSet));
  }
  return { reads, first, second, settled, marks, agreement };
}
