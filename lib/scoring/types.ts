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
