import type { ClassSet } from '@/lib/class-sets/schema';
import type { ScoringMark } from '@/lib/scoring/types';

export type ReadKind = 'first' | 'second' | 'settled';
export type ReadStatus = 'open' | 'submitted';

/** One read as GET /api/reads/:id returns it (see the scoring API contract). */
export interface ReadDetail {
  id: string | number;
  collectionId: string | number;
  stallion: string;
  /** ISO date-time of the collection. */
  collectedAt: string;
  kind: ReadKind;
  status: ReadStatus;
  readerId: string | number;
  readerName: string;
  targetCells: number;
  classSet: ClassSet;
  /** The signed-in user is the reader and the read is open. */
  canEdit: boolean;
}

/** A field image of the read's collection, in position order. */
export interface FieldImageRef {
  id: string;
  fileName: string;
  width: number;
  height: number;
  micronsPerPixel: number | null;
  position: number;
  displayUrl: string;
  thumbUrl: string;
}

/** Body of GET /api/reads/:id, and what the page hands the workbench. */
export interface ReadPayload {
  read: ReadDetail;
  images: FieldImageRef[];
  marks: ScoringMark[];
}

export interface ScoringWorkbenchProps {
  initial: ReadPayload;
}
