'use client';

import { useMemo, useState } from 'react';
import { pairingDistancePx } from '@/lib/agreement/pairing';
import type { CandidateSkip, FieldImageRef, ImageCandidateSet, Point, ScoringMark } from '@/lib/scoring/types';
import { candidateStates, headLengthPx, openCounts, readingOrder, type CandidateState, type WalkImage } from '@/lib/scoring/walk';

/*
 * Every image's candidates in reading order with their state for this read (lib/scoring/walk.ts),
 * for the canvas's rings, the walk and the counts. An image is worked out again only when its
 * candidates, marks or skips changed, so a key press costs one image's pairing, not the read's.
 */

export interface ImageWalk extends WalkImage {
  /** The search's state for the image. */
  status: ImageCandidateSet['status'];
  /** Points with their states, for the canvas. */
  rings: (Point & { state: CandidateState })[];
}

type Cached = { src: ImageCandidateSet | undefined; marks: ScoringMark[]; skips: CandidateSkip[]; walk: ImageWalk };

const sameList = <T,>(a: readonly T[], b: readonly T[]) => a.length === b.length && a.every((x, i) => x === b[i]);

function groupByImage<T extends { imageId: string }>(items: Iterable<T>): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const it of items) {
    const list = out.get(it.imageId);
    if (list) list.push(it);
    else out.set(it.imageId, [it]);
  }
  return out;
}

const EMPTY: never[] = [];

export function useCellWalk(images: readonly FieldImageRef[], candidates: Record<string, ImageCandidateSet>, marks: ReadonlyMap<string, ScoringMark>, skips: ReadonlyMap<string, CandidateSkip>) {
  // Per image: what it was worked out from, and the result (kept for the component's life).
  const [cache] = useState(() => new Map<string, Cached>());
  const walkImages = useMemo(() => {
    const marksBy = groupByImage(marks.values());
    const skipsBy = groupByImage(skips.values());
    return images.map((img): ImageWalk => {
      const src = candidates[img.id];
      const m = marksBy.get(img.id) ?? EMPTY;
      const k = skipsBy.get(img.id) ?? EMPTY;
      const hit = cache.get(img.id);
      if (hit && hit.src === src && sameList(hit.marks, m) && sameList(hit.skips, k)) return hit.walk;
      const raw = src?.points ?? EMPTY;
      const points = hit && hit.src === src ? hit.walk.points : readingOrder(raw, headLengthPx(img.micronsPerPixel)).map((i) => ({ x: raw[i]!.x, y: raw[i]!.y }));
      const states = candidateStates(points, m, k, pairingDistancePx(img.micronsPerPixel));
      const walk: ImageWalk = { status: src?.status ?? 'failed', points, states, rings: points.map((p, i) => ({ x: p.x, y: p.y, state: states[i]! })) };
      cache.set(img.id, { src, marks: m, skips: k, walk });
      return walk;
    });
  }, [cache, images, candidates, marks, skips]);
  const counts = useMemo(() => openCounts(walkImages), [walkImages]);
  return { walkImages, counts };
}
