import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/db/knex';
import { json, type Row } from '@/db/row';
import type { CurrentUser } from '@/lib/auth/session';
import type { ClassSet } from '@/lib/class-sets/schema';
import { morphologyOfRead, type CellCount, type Morphology } from '@/lib/morphology/engine';
import { numberReads, type ReadKind, type ReadStatus } from '@/lib/reads/kinds';
import { visibleReadsOfCollections } from '@/lib/reads/policy';

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
  /** Its place among the collection's reads, from 1 (lib/reads/kinds.ts numberReads). */
  number: number;
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
 * The morphology of every read in scope that the actor may see (lib/reads/policy.ts
 * visibleReads: a blind second reader sees only their own read; nobody else sees an open second
 * read), in read order. The visibility rule looks at every read of the collections involved, so
 * they are loaded whatever the scope.
 */
export async function morphologyOfReads(actor: CurrentUser, scope: ReadScope, options: MorphologyQueryOptions = {}): Promise<ReadMorphology[]> {
  const ids = 'readIds' in scope ? scope.readIds : scope.collectionIds;
  if (ids.length === 0) return [];
  const collectionsOf = 'readIds' in scope ? db('reads').whereIn('id', [...scope.readIds]).select('collection_id') : [...scope.collectionIds];
  const [reads, groups] = await Promise.all([
    db('reads as r')
      .join('users as u', 'u.id', 'r.reader_id')
      .whereIn('r.collection_id', collectionsOf)
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
  const refs = reads.map((r) => ({ id: r.id as number, collectionId: r.collection_id as number, kind: r.kind as ReadKind, status: r.status as ReadStatus, readerId: r.reader_id as number, row: r }));
  const numbers = new Map<number, number>();
  for (const c of new Set(refs.map((r) => r.collectionId))) for (const [id, n] of numberReads(refs.filter((r) => r.collectionId === c))) numbers.set(id, n);
  const wanted = 'readIds' in scope ? new Set(scope.readIds) : null;
  return visibleReadsOfCollections(actor, refs)
    .filter((ref) => !wanted || wanted.has(ref.id))
    .map(({ row: r }) => {
      const classSet = json<ClassSet>(r.class_set_snapshot);
      return {
        readId: r.id,
        collectionId: r.collection_id,
        number: numbers.get(r.id) ?? 1,
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
    number: r.number,
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
