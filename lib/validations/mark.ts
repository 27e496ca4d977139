import { z } from 'zod';
import { FIRST_READ, SECOND_READ } from '@/lib/reads/kinds';

const uuid = (what: string) => z.string().regex(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/i, `${what} must be a UUID v4 made by the browser.`);

export const markPayloadSchema = z.object({
  id: uuid('The mark id').optional(),
  imageId: z.union([z.string().regex(/^\d+$/, 'Unknown image.'), z.number().int().positive()]).transform(Number),
  x: z.number({ error: 'x must be a number (image pixels).' }).finite(),
  y: z.number({ error: 'y must be a number (image pixels).' }).finite(),
  classKey: z.string().min(1).max(40),
  tags: z.array(z.string().min(1).max(40)).max(12).default([]),
  version: z.number().int().optional(),
});

const changeFields = {
  opId: uuid('The change id'),
  kind: z.enum(['upsert', 'delete']),
  baseVersion: z.number().int().min(0).optional(),
  queuedAt: z.number().optional(),
};

const markChangeObject = z.object({ ...changeFields, entity: z.literal('mark').optional(), markId: uuid('The mark id'), payload: markPayloadSchema.nullable() });
const needsPayload = (c: { kind: string; payload: unknown }) => c.kind === 'delete' || c.payload !== null;

export const changeSchema = markChangeObject.refine(needsPayload, { path: ['payload'], message: 'An upsert needs the mark.' });

/** A skipped candidate ("not a cell"), by its position: per read, saved like a mark, never counted. */
export const skipPayloadSchema = z.object({
  id: uuid('The skip id').optional(),
  imageId: markPayloadSchema.shape.imageId,
  x: markPayloadSchema.shape.x,
  y: markPayloadSchema.shape.y,
  version: z.number().int().optional(),
});
/** `markId` is the skip's own id here: the queue keeps one line of changes per record. */
const skipChangeObject = z.object({ ...changeFields, entity: z.literal('skip'), markId: uuid('The skip id'), payload: skipPayloadSchema.nullable() });

const syncChangeSchema = z
  .discriminatedUnion('entity', [markChangeObject, skipChangeObject])
  .refine(needsPayload, { path: ['payload'], message: 'An upsert needs the mark or the skipped candidate.' });

export const syncSchema = z.object({ changes: z.array(syncChangeSchema).min(1, 'Send at least one change.').max(200, 'Send at most 200 changes at once.') });
export type ChangeInput = z.output<typeof changeSchema>;
export type SkipChangeInput = z.output<typeof skipChangeObject>;
export type SyncChangeInput = z.output<typeof syncChangeSchema>;

export const readParams = z.object({ id: z.coerce.number().int().positive('Unknown read.') });
export const markParams = readParams.extend({ markId: uuid('The mark id') });
export const putMarkSchema = markPayloadSchema.omit({ id: true, version: true }).extend({ opId: uuid('The change id'), baseVersion: z.number().int().min(0).optional() });
export const deleteMarkQuery = z.object({ opId: uuid('The change id'), baseVersion: z.coerce.number().int().min(0).optional() });
export const startReadSchema = z.object({ kind: z.enum([FIRST_READ, SECOND_READ], 'Start a first or a second read here; a settled read is written by settling.') });
