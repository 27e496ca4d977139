import { expect } from 'vitest';
import { jpegOf } from '../../unit/images/fixtures';
import { goodCollection, makeStallion } from '../support/fixtures';
import type { Session } from '../support/http';

/** A cell to mark: position on the image (px) and class. */
export type Cell = { x: number; y: number; classKey: string };

/** A new stallion and collection with one field image (1000 × 800 px), made through the API as `s`. */
export async function collectionWithImage(s: Session, opts: { micronsPerPixel?: number; collectedAt?: string } = {}) {
  const st = await makeStallion();
  const created = await s.json('/api/collections', 'POST', goodCollection(st.id, opts.collectedAt ? { collectedAt: opts.collectedAt } : {}));
  expect(created.status).toBe(201);
  const collectionId = created.body.collection.id as number;
  const qs = new URLSearchParams({ name: 'field.jpg', ...(opts.micronsPerPixel ? { micronsPerPixel: String(opts.micronsPerPixel) } : {}) });
  const res = await s.fetch(`/api/collections/${collectionId}/images?${qs}`, { method: 'POST', body: new Uint8Array(await jpegOf(1000, 800)) });
  expect(res.status).toBe(201);
  const imageId = String(((await res.json()) as { image: { id: number } }).image.id);
  return { stallionId: st.id as number, collectionId, imageId };
}

/** Starts a read of `kind` as `s` (expecting 201) and returns its id. */
export async function startRead(s: Session, collectionId: number, kind: 'first' | 'second'): Promise<number> {
  const r = await s.json(`/api/collections/${collectionId}/reads`, 'POST', { kind });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return r.body.read.id as number;
}

/** Marks these cells in the read through the sync route; returns the marks' ids in order. */
export async function mark(s: Session, readId: number, imageId: string, cells: Cell[]): Promise<string[]> {
  const ids = cells.map(() => crypto.randomUUID());
  const changes = cells.map((c, i) => ({ opId: crypto.randomUUID(), markId: ids[i], kind: 'upsert', payload: { id: ids[i], imageId, x: c.x, y: c.y, classKey: c.classKey, tags: [] } }));
  for (let i = 0; i < changes.length; i += 200) {
    const r = await s.json(`/api/reads/${readId}/sync`, 'POST', { changes: changes.slice(i, i + 200) });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
  }
  return ids;
}

export async function submit(s: Session, readId: number) {
  const r = await s.json(`/api/reads/${readId}/submit`, 'POST', {});
  expect(r.status, JSON.stringify(r.body)).toBe(200);
}

/** `n` cells on a grid 40 px apart, the first `normal` of them normal and the rest with a head defect. */
export const grid = (n: number, normal: number): Cell[] =>
  Array.from({ length: n }, (_, i) => ({ x: 30 + (i % 20) * 40, y: 30 + Math.floor(i / 20) * 40, classKey: i < normal ? 'normal' : 'abnormal_head' }));
