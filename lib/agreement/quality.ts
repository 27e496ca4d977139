/**
 * Reader quality over a period, per reader, from each collection's agreement figures
 * (lib/agreement/agreement.ts) between its submitted first and second reads. Pure.
 *
 * For each reader:
 * - collections read as first and as second reader (submitted reads in the period), and how many
 *   of them were compared with another reader's read (both reads submitted);
 * - mean Cohen's kappa against the other reader, over the compared collections with a kappa;
 * - mean bias in % normal, this reader minus the other, in percentage points (positive: this
 *   reader calls more cells normal), over the compared collections where both reads counted sperm;
 * - how often the two % normal values differed by more than the acceptable difference;
 * - which classes the reader confuses most: over paired cells where the two readers differ, the
 *   (this reader's class, the other reader's class) pairs by count, from the confusion matrices.
 * Each figure carries the number of collections behind it.
 */
import type { CollectionAgreement } from './agreement';

export interface QualityReader {
  id: number;
  name: string;
}

export interface QualityCollection {
  collectionId: number;
  collectedAt: string;
  first: QualityReader;
  second: QualityReader;
  agreement: Pick<CollectionAgreement, 'kappa' | 'percentNormal' | 'acceptableDifference' | 'confusion'>;
}

export interface QualityRead {
  collectionId: number;
  kind: 'first' | 'second';
  reader: QualityReader;
}

export interface Confusion {
  /** The class this reader gave. */
  said: string;
  /** The class the other reader gave the same cell. */
  otherSaid: string;
  count: number;
}

export interface ReaderCollectionPoint {
  collectionId: number;
  collectedAt: string;
  as: 'first' | 'second';
  otherReader: string;
  kappa: number | null;
  /** This reader's % normal minus the other's, percentage points. */
  bias: number | null;
  exceeded: boolean | null;
}

export interface ReaderQuality {
  reader: QualityReader;
  asFirst: number;
  asSecond: number;
  compared: number;
  meanKappa: number | null;
  kappaCollections: number;
  meanBias: number | null;
  biasCollections: number;
  exceeded: number;
  exceededCollections: number;
  /** Most frequent first, at most `topConfusions`. */
  confusions: Confusion[];
  /** Cells paired with the other reader and given another class, in all. */
  confusedCells: number;
  points: ReaderCollectionPoint[];
}

const mean = (xs: number[]) => (xs.length ? xs.reduce((s, v) => s + v, 0) / xs.length : null);

export function readerQuality(reads: readonly QualityRead[], compared: readonly QualityCollection[], options: { topConfusions?: number } = {}): ReaderQuality[] {
  const top = options.topConfusions ?? 5;
  type Acc = { reader: QualityReader; first: Set<number>; second: Set<number>; points: ReaderCollectionPoint[]; confusion: Map<string, Confusion> };
  const byReader = new Map<number, Acc>();
  const acc = (r: QualityReader) => {
    let a = byReader.get(r.id);
    if (!a) byReader.set(r.id, (a = { reader: r, first: new Set(), second: new Set(), points: [], confusion: new Map() }));
    return a;
  };
  for (const r of reads) acc(r.reader)[r.kind].add(r.collectionId);

  for (const c of [...compared].sort((a, b) => a.collectedAt.localeCompare(b.collectedAt) || a.collectionId - b.collectionId)) {
    const { kappa, percentNormal: pn, acceptableDifference: ad, confusion } = c.agreement;
    for (const as of ['first', 'second'] as const) {
      const me = as === 'first' ? c.first : c.second;
      const other = as === 'first' ? c.second : c.first;
      const a = acc(me);
      a[as].add(c.collectionId);
      const mine = as === 'first' ? pn.first : pn.second;
      const theirs = as === 'first' ? pn.second : pn.first;
      a.points.push({
        collectionId: c.collectionId,
        collectedAt: c.collectedAt,
        as,
        otherReader: other.name,
        kappa,
        bias: mine === null || theirs === null ? null : mine - theirs,
        exceeded: ad ? ad.differ : null,
      });
      for (const [firstKey, row] of Object.entries(confusion)) {
        for (const [secondKey, n] of Object.entries(row)) {
          if (firstKey === secondKey || n === 0) continue;
          const said = as === 'first' ? firstKey : secondKey;
          const otherSaid = as === 'first' ? secondKey : firstKey;
          const k = `${said}\u0000${otherSaid}`;
          const x = a.confusion.get(k);
          if (x) x.count += n;
          else a.confusion.set(k, { said, otherSaid, count: n });
        }
      }
    }
  }

  return [...byReader.values()]
    .map((a): ReaderQuality => {
      const kappas = a.points.flatMap((p) => (p.kappa === null ? [] : [p.kappa]));
      const biases = a.points.flatMap((p) => (p.bias === null ? [] : [p.bias]));
      const differs = a.points.flatMap((p) => (p.exceeded === null ? [] : [p.exceeded]));
      const confusions = [...a.confusion.values()].sort((x, y) => y.count - x.count || x.said.localeCompare(y.said) || x.otherSaid.localeCompare(y.otherSaid));
      return {
        reader: a.reader,
        asFirst: a.first.size,
        asSecond: a.second.size,
        compared: a.points.length,
        meanKappa: mean(kappas),
        kappaCollections: kappas.length,
        meanBias: mean(biases),
        biasCollections: biases.length,
        exceeded: differs.filter(Boolean).length,
        exceededCollections: differs.length,
        confusions: confusions.slice(0, top),
        confusedCells: confusions.reduce((s, c) => s + c.count, 0),
        points: a.points,
      };
    })
    .sort((x, y) => x.reader.name.localeCompare(y.reader.name));
}
