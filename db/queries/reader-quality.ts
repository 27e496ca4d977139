import 'server-only';
import { db } from '@/db/knex';
import { pairingDistanceOf } from '@/db/queries/agreement-core';
import { getLabSettings } from '@/db/queries/settings';
import { json, type Row } from '@/db/row';
import { collectionAgreement, pairCollection } from '@/lib/agreement/agreement';
import { pairingDistancePx, type PairingMark } from '@/lib/agreement/pairing';
import { readerQuality, type QualityCollection, type QualityRead, type ReaderQuality } from '@/lib/agreement/quality';
import { forbidden } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet } from '@/lib/class-sets/schema';
import { morphologyClasses } from '@/lib/morphology/engine';
import { FIRST_READ, SECOND_READ, SUBMITTED } from '@/lib/reads/kinds';
import { latestSubmitted } from '@/lib/reports/readiness';
import { labDateEnd, labDateStart } from '@/lib/time/lab-time';

/*
 * The reader-quality figures for a period: four queries for the whole period whatever its size
 * (the collections' submitted first and second reads with their readers, the marks of the reads
 * compared, the field images' scales), then each collection's agreement from lib/agreement, as
 * its report computes it (latest submitted first and second read, paired image by image), and the
 * per-reader figures from lib/agreement/quality.ts.
 */

export interface ReaderQualityReport {
  from: string;
  to: string;
  /** Collections with both reads submitted in the period. */
  comparedCollections: number;
  readers: ReaderQuality[];
  /** Class key → name, from the reads' class sets (for the confusion lists). */
  classNames: Record<string, string>;
}

export async function getReaderQuality(actor: CurrentUser, period: { from: string; to: string }): Promise<ReaderQualityReport> {
  if (actor.role !== 'lab_manager') throw forbidden('Only the lab manager sees reader quality.');
  const settings = await getLabSettings();
  const { timeZone } = settings;
  const distance = pairingDistanceOf(settings);
  const reads: Row[] = await db('reads as r')
    .join('collections as c', 'c.id', 'r.collection_id')
    .join('users as u', 'u.id', 'r.reader_id')
    .whereIn('r.kind', [FIRST_READ, SECOND_READ])
    .where('r.status', SUBMITTED)
    .where('c.collected_at', '>=', labDateStart(period.from, timeZone))
    .where('c.collected_at', '<', labDateEnd(period.to, timeZone))
    .orderBy('r.id')
    .select('r.id', 'r.collection_id', 'r.kind', 'r.status', 'r.reader_id', 'r.class_set_snapshot', 'u.name as reader_name', 'c.collected_at');

  const byCollection = new Map<number, Row[]>();
  for (const r of reads) (byCollection.get(r.collection_id) ?? byCollection.set(r.collection_id, []).get(r.collection_id)!).push(r);
  const pairsOfReads = [...byCollection.entries()].flatMap(([collectionId, rs]) => {
    const refs = rs.map((r) => ({ id: r.id, kind: r.kind, status: r.status, readerId: r.reader_id, readerName: r.reader_name, row: r }));
    const first = latestSubmitted(refs, FIRST_READ);
    const second = latestSubmitted(refs, SECOND_READ);
    return first && second ? [{ collectionId, first, second }] : [];
  });

  const readIds = pairsOfReads.flatMap((p) => [p.first.id, p.second.id]);
  const collectionIds = pairsOfReads.map((p) => p.collectionId);
  const [marks, images]: [Row[], Row[]] = await Promise.all([
    readIds.length ? db('marks').whereIn('read_id', readIds).where('deleted', false).orderBy('id').select('id', 'read_id', 'image_id', 'x', 'y', 'class_key') : Promise.resolve([]),
    collectionIds.length ? db('field_images').whereIn('collection_id', collectionIds).orderBy('position').orderBy('id').select('id', 'collection_id', 'microns_per_pixel') : Promise.resolve([]),
  ]);
  const marksOf = new Map<number, Row[]>();
  for (const m of marks) (marksOf.get(m.read_id) ?? marksOf.set(m.read_id, []).get(m.read_id)!).push(m);

  const classNames: Record<string, string> = {};
  const compared: QualityCollection[] = pairsOfReads.map(({ collectionId, first, second }) => {
    const classSet = json<ClassSet>(first.row.class_set_snapshot);
    for (const c of classSet.classes) classNames[c.key] ??= c.name;
    const sperm = new Map(classSet.classes.map((c) => [c.key, c.countsAsSperm]));
    const asPairing = (m: Row): PairingMark & { imageId: string } => ({ id: m.id, x: Number(m.x), y: Number(m.y), classKey: m.class_key, countsAsSperm: sperm.get(m.class_key) ?? true, imageId: String(m.image_id) });
    const a = (marksOf.get(first.id) ?? []).map(asPairing);
    const b = (marksOf.get(second.id) ?? []).map(asPairing);
    const pairings = pairCollection(
      images
        .filter((im) => im.collection_id === collectionId)
        .map((im) => ({
          imageId: String(im.id),
          first: a.filter((m) => m.imageId === String(im.id)),
          second: b.filter((m) => m.imageId === String(im.id)),
          maxDistancePx: pairingDistancePx(im.microns_per_pixel == null ? null : Number(im.microns_per_pixel), distance),
        })),
    );
    return {
      collectionId,
      collectedAt: new Date(first.row.collected_at).toISOString(),
      first: { id: first.readerId, name: first.readerName },
      second: { id: second.readerId, name: second.readerName },
      agreement: collectionAgreement(pairings, morphologyClasses(classSet)),
    };
  });
  const qualityReads: QualityRead[] = [...byCollection.values()].flatMap((rs) => rs.map((r) => ({ collectionId: r.collection_id, kind: r.kind, reader: { id: r.reader_id, name: r.reader_name } })));
  return { ...period, comparedCollections: compared.length, readers: readerQuality(qualityReads, compared), classNames };
}
