// A collection with reads in a chosen state, made straight in the database as the app account, for
// the report tests (HTTP and browser). The cells are the example report's (lib/reports/fixture.ts):
// 263 sperm cells, 81 normal, with its extra defect tags, and 9 non-sperm cells; the semen values
// are the example's too, so a report made from this collection carries the example's figures.
// Second and settled reads are written as rows: the second-read feature's own routes come with it.
import type { Knex } from 'knex';
import { EXAMPLE_CLASS_COUNTS, EXAMPLE_EXTRA_TAGS } from '../../lib/reports/fixture';
import { DEMO_USERS } from '../../lib/demo/users';

export type ReadsState = 'first-open' | 'first-only' | 'second-open' | 'unsettled' | 'settled' | 'agreeing';

export interface BuiltCollection {
  collectionId: number;
  stallionId: number;
  clientId: number;
  imageIds: number[];
  reads: { first: number; second?: number; settled?: number };
  /** Cells the first read gave another class than the second (and the settled read). */
  disagreements: number;
}

type Cell = { x: number; y: number; classKey: string; tags: string[] };

/** The example's cells on a grid 60 px apart (far beyond any pairing distance), with its extra tags. */
export function exampleCells(): Cell[] {
  const keys = Object.entries(EXAMPLE_CLASS_COUNTS).flatMap(([k, n]) => Array.from({ length: n }, () => k));
  const cells: Cell[] = keys.map((classKey, i) => ({ x: 30 + (i % 25) * 60, y: 30 + Math.floor(i / 25) * 60, classKey, tags: [] }));
  // Each defect's extra tags on abnormal sperm cells of another class, one tag of a kind per cell.
  const abnormal = cells.filter((c) => c.classKey !== 'normal' && c.classKey !== 'round_cell' && c.classKey !== 'leukocyte');
  let next = 0;
  for (const [tag, n] of Object.entries(EXAMPLE_EXTRA_TAGS)) {
    for (let placed = 0; placed < n; ) {
      const c = abnormal[next++ % abnormal.length]!;
      if (c.classKey === tag || c.tags.includes(tag)) continue;
      c.tags.push(tag);
      placed++;
    }
  }
  return cells;
}

/** The first read's classes where it disagrees with the second: six cells, three called normal, three another defect. */
const FIRST_READ_DIFFERENT: Record<number, string> = { 100: 'normal', 120: 'normal', 140: 'normal', 160: 'abnormal_head', 180: 'bent_coiled_tail', 200: 'proximal_droplet' };

export async function userId(db: Knex, email: string): Promise<number> {
  return (await db('users').where({ email }).first('id')).id;
}

export async function buildReportCollection(
  db: Knex,
  opts: { reads: ReadsState; stallionId?: number; clientEmail?: string | null; collectedAt?: Date; collectionId?: number; imageIds?: number[]; name?: string },
): Promise<BuiltCollection> {
  const tech = await userId(db, DEMO_USERS[0]!.email);
  const reader = await userId(db, DEMO_USERS[1]!.email);
  let stallionId = opts.stallionId;
  let clientId: number;
  if (stallionId) {
    clientId = (await db('stallions').where({ id: stallionId }).first('client_id')).client_id;
  } else {
    const tag = `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`;
    [clientId] = await db('clients').insert({ name: `Report test owner ${tag}`, kind: 'owner', email: opts.clientEmail === undefined ? `owner-${tag}@quillfield.example` : opts.clientEmail });
    [stallionId] = await db('stallions').insert({ name: opts.name ?? `Report Test ${tag}`, client_id: clientId, registration: `RPT-${tag}`, breed: 'Warmblood', foaling_year: 2015 });
  }
  let collectionId = opts.collectionId;
  if (!collectionId) {
    [collectionId] = await db('collections').insert({
      stallion_id: stallionId, collected_at: opts.collectedAt ?? new Date('2026-05-26T07:40:00.000Z'), number_that_day: 1,
      volume_ml: 38, concentration_m_per_ml: 165, total_motility_pct: 62, progressive_motility_pct: 45,
      preparation: 'eosin_nigrosin', optics: 'bright_field', magnification: 1000, collected_by: 'Tamsin Reedway', recorded_by: tech, remarks: 'Report test collection',
    });
  }
  let imageIds = opts.imageIds;
  if (!imageIds?.length) {
    const image = (n: number) => ({
      collection_id: collectionId, position: n, file_name: `report-test-${n}.jpg`, format: 'jpeg', bytes: 1000, width: 1600, height: 1200, sha256: crypto.randomUUID().replace(/-/g, '').padEnd(64, '0'),
      original_key: 'missing/original.jpg', display_key: 'missing/display.jpg', thumb_key: 'missing/thumb.jpg', display_width: 1600, display_height: 1200, uploaded_by: tech,
    });
    const [a] = await db('field_images').insert(image(1));
    // A second image without marks (it can be deleted while nothing is signed).
    const [b] = await db('field_images').insert(image(2));
    imageIds = [a, b];
  }
  const set = await db('class_sets').where({ is_default: true }).first();
  const snapshot = JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes });
  const read = async (kind: string, reader_id: number, status: 'open' | 'submitted') =>
    (await db('reads').insert({ collection_id: collectionId, kind, reader_id, class_set_id: set.id, class_set_snapshot: snapshot, target_cells: 200, status, submitted_at: status === 'submitted' ? new Date() : null }))[0] as number;
  const marks = async (readId: number, cells: Cell[], by: number) => {
    await db('marks').insert(
      cells.map((c) => ({ id: crypto.randomUUID(), read_id: readId, image_id: imageIds![0], x: c.x, y: c.y, class_key: c.classKey, tags: JSON.stringify(c.tags), version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: by })),
    );
  };

  const settledCells = exampleCells();
  const differs = opts.reads === 'settled' || opts.reads === 'unsettled' || opts.reads === 'second-open';
  const firstCells = settledCells.map((c, i) => (differs && FIRST_READ_DIFFERENT[i] ? { ...c, classKey: FIRST_READ_DIFFERENT[i]!, tags: [] } : c));
  const reads: BuiltCollection['reads'] = { first: await read('first', tech, opts.reads === 'first-open' ? 'open' : 'submitted') };
  await marks(reads.first, firstCells, tech);
  if (opts.reads !== 'first-open' && opts.reads !== 'first-only') {
    reads.second = await read('second', reader, opts.reads === 'second-open' ? 'open' : 'submitted');
    await marks(reads.second, settledCells, reader);
  }
  if (opts.reads === 'settled') {
    reads.settled = await read('settled', reader, 'submitted');
    await marks(reads.settled, settledCells, reader);
  }
  return { collectionId: collectionId!, stallionId: stallionId!, clientId, imageIds, reads, disagreements: differs ? Object.keys(FIRST_READ_DIFFERENT).length : 0 };
}
