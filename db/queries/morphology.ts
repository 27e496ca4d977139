import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { json, type Row } from '@/db/row';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet } from '@/lib/class-sets/schema';
import { morphologyOfRead, type CellCount, type Morphology } from '@/lib/morphology/engine';
import type { ReadKind, ReadStatus } from '@/lib/reads/kinds';
import { mayViewMarks } from '@/lib/reads/policy';

/*
 * The totals of reads, for every screen: one grouped query over the marks feeds the morphology
 * engine (lib/morphology/engine.ts), which the browser's tally uses too. The query groups live
 * marks by read, primary class and tag set (and field image when asked), on the marks index
 * (read_id, deleted, class_key); a second query, run beside it, fetches the reads' class-set
 * snapshots. One read, the reads of one collection, or those of many collections (a list page,
 * a stallion's history) cost the same two queries.
 */

/** One read and everything the engine worked out for it. */
export interface ReadMorphology {
  readId: number;
  collectionId: number;
  kind: ReadKind;
  status: ReadStatus;
  readerId: number;
  readerName: string;
  /** Name of the class set the read was scored with (its snapshot). */
  classSetName: string;
  morphology: Morphology;
}

export type ReadScope = { readIds: readonly number[] } | { collectionIds: readonly number[] };

export interface MorphologyQueryOptions {
  /** Also group by field image, for `morphology.perImage` (the scoring page's per-image tally). */
  byImage?: boolean;
}

function inScope(q: Knex.QueryBuilder, scope: ReadScope, reads = 'r'): Knex.QueryBuilder {
  return 'readIds' in scope ? q.whereIn(`${reads}.id`, [...scope.readIds]) : q.whereIn(`${reads}.collection_id`, [...scope.collectionIds]);
}

/**
 * The grouped query: live marks counted by read, primary class and tag set (and image when asked).
 * Exported for the test that checks MariaDB answers it from the marks index.
 */
export function cellCountsQuery(scope: ReadScope, options: MorphologyQueryOptions = {}): Knex.QueryBuilder {
  const groupBy = options.byImage ? ['m.read_id', 'm.class_key', 'm.tags', 'm.image_id'] : ['m.read_id', 'm.class_key', 'm.tags'];
  return inScope(db('marks as m').join('reads as r', 'r.id', 'm.read_id'), scope).where('m.deleted', false).groupBy(groupBy).select(groupBy).count({ n: '*' });
}

/**
 * The morphology of every read in scope that the actor may see (a blind second read stays out
 * until it is submitted), in read order.
 */
export async function morphologyOfReads(actor: CurrentUser, scope: ReadScope, options: MorphologyQueryOptions = {}): Promise<ReadMorphology[]> {
  const ids = 'readIds' in scope ? scope.readIds : scope.collectionIds;
  if (ids.length === 0) return [];
  const [reads, groups] = await Promise.all([
    inScope(db('reads as r').join('users as u', 'u.id', 'r.reader_id'), scope)
      .orderBy('r.id')
      .select('r.id', 'r.collection_id', 'r.kind', 'r.status', 'r.reader_id', 'r.target_cells', 'r.class_set_snapshot', 'u.name as reader_name') as Promise<Row[]>,
    cellCountsQuery(scope, options) as Promise<Row[]>,
  ]);
  const cellsByRead = new Map<number, CellCount[]>();
  for (const g of groups) {
    const row: CellCount = { classId: g.class_key, tags: json<string[]>(g.tags), count: Number(g.n) };
    if (options.byImage) row.imageId = String(g.image_id);
    const list = cellsByRead.get(g.read_id);
    if (list) list.push(row);
    else cellsByRead.set(g.read_id, [row]);
  }
  return reads
    .filter((r) => mayViewMarks(actor, { id: r.id, kind: r.kind, status: r.status, readerId: r.reader_id }))
    .map((r) => {
      const classSet = json<ClassSet>(r.class_set_snapshot);
      return {
        readId: r.id,
        collectionId: r.collection_id,
        kind: r.kind,
        status: r.status,
        readerId: r.reader_id,
        readerName: r.reader_name,
        classSetName: classSet.name,
        morphology: morphologyOfRead({ classSet, targetCells: r.target_cells }, cellsByRead.get(r.id) ?? []),
      };
    });
}

/** The reads of one collection with their morphology. */
export function morphologyForCollection(actor: CurrentUser, collectionId: number): Promise<ReadMorphology[]> {
  return morphologyOfReads(actor, { collectionIds: [collectionId] });
}

/** The reads of many collections (a list page, a stallion's history), by collection id. */
export async function morphologyByCollection(actor: CurrentUser, collectionIds: readonly number[]): Promise<Map<number, ReadMorphology[]>> {
  const out = new Map<number, ReadMorphology[]>(collectionIds.map((id) => [id, []]));
  for (const r of await morphologyOfReads(actor, { collectionIds })) out.get(r.collectionId)?.push(r);
  return out;
}

/**
 * The JSON of GET /api/collections/:id/morphology: each read with its full `morphology`, plus the
 * headline fields this route has always carried (copies of morphology's figures, kept so callers
 * written against them keep working).
 */
export function morphologyJson(r: ReadMorphology) {
  const m = r.morphology;
  return {
    readId: r.readId,
    kind: r.kind,
    status: r.status,
    readerId: r.readerId,
    readerName: r.readerName,
    classSetName: r.classSetName,
    cellsCounted: m.cellsCounted,
    nonSperm: m.nonSpermCounted,
    normal: m.normalCount,
    pctNormal: m.pctNormal,
    wilson: m.normalIntervalPct,
    target: m.target,
    targetReached: m.targetReached,
    perClass: m.cells.perClass.map((c) => ({ classKey: c.classId, name: c.name, count: c.count, pct: c.pctOfCells })),
    morphology: m,
  };
}
