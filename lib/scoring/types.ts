import type Konva from 'konva';
import type { ClassSet } from '@/lib/class-sets/schema';
import type { ReadKind, ReadStatus } from '@/lib/reads/kinds';

/** A point in image pixels or screen pixels (the function's name says which). */
export interface Point {
  x: number;
  y: number;
}

/**
 * The canvas's view of a mark. `id` is a UUID v4 made in the browser, so a retried
 * save can never create a second row; `version` is the server's counter (absent
 * until the server has stored the mark).
 */
export interface ScoringMark {
  id: string;
  imageId: string;
  x: number;
  y: number;
  classKey: string;
  tags: string[];
  version?: number;
}

/** Anything with a client-made id: the history, queue and merge work on any mark shape. */
export interface HasId {
  id: string;
}

const UUID_V4 = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/i;

export function isUuidV4(s: string): boolean {
  return UUID_V4.test(s);
}

/** A new mark or operation id; the crypto source is injectable for tests. */
export function newId(source: { randomUUID(): string } = globalThis.crypto): string {
  return source.randomUUID();
}

/*
 * A read as the scoring page and GET /api/reads/:id see it. Shared by the server (db/queries/reads.ts
 * builds it) and the browser (the workbench renders it), so both sides agree on one shape.
 */

/** One read, with what the signed-in user may do with it. */
export interface ReadDetail {
  id: number;
  collectionId: number;
  stallion: string;
  /** ISO date-time of the collection. */
  collectedAt: string;
  kind: ReadKind;
  status: ReadStatus;
  readerId: number;
  readerName: string;
  targetCells: number;
  /** The class set as it was when the read started. */
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

/**
 * A candidate the reader skipped as "not a cell" during the walk. Per read, saved like a mark
 * (client-made id, versioned) and never counted; `skip: true` tells it from a mark in the undo
 * history and the change queue.
 */
export interface CandidateSkip {
  id: string;
  imageId: string;
  x: number;
  y: number;
  skip: true;
  version?: number;
}

/** What the change queue and the undo history carry: a mark, or a skipped candidate. */
export type SyncRecord = ScoringMark | CandidateSkip;

export function isSkip(r: SyncRecord): r is CandidateSkip {
  return 'skip' in r;
}

/** A field image's machine candidates (the image's, the same for every read) and the search's state. */
export interface ImageCandidateSet {
  status: 'waiting' | 'running' | 'done' | 'failed';
  /** Image pixels; empty until the search is done. */
  points: { x: number; y: number; score: number }[];
  /** A done search that gave no candidates on purpose (scale too coarse…), in a technician's words. */
  skipped?: string;
}

/** Body of GET /api/reads/:id, and what the page hands the workbench. */
export interface ReadPayload {
  read: ReadDetail;
  images: FieldImageRef[];
  marks: ScoringMark[];
  /** Candidates by image id. */
  candidates: Record<string, ImageCandidateSet>;
  /** This read's skips: only its own reader gets them (empty for anyone else). */
  skips: CandidateSkip[];
  /** The lab setting: whether the canvas shows candidates (and offers the walk) to begin with. */
  candidatesShown: boolean;
}

/** What the workbench (toolbar buttons and keys) can ask of the canvas. */
export interface FieldCanvasControl {
  fit(): void;
  zoomBy(factor: number): void;
  /** Arrow-key pan; false if the key is not an arrow. */
  panKey(key: string, shift: boolean): boolean;
  panBy(dx: number, dy: number): void;
  setSpacePan(on: boolean): void;
  /**
   * Enter on the canvas, as a click at the centre cross: selects the mark under the cross,
   * or places a new one there. 'off-image' when the cross is not over the image.
   */
  pressAtCentre(): 'selected' | 'placed' | 'off-image';
  /** Centre the view on an image point; with `scale`, zoom to it too. */
  centreOn(p: Point, scale?: number): void;
  /** The view's size in screen pixels (0 × 0 before it is laid out). */
  viewSize(): { w: number; h: number };
  /** Whether keyboard focus is on the canvas itself. */
  hasFocus(): boolean;
  getStage(): Konva.Stage | null;
}
