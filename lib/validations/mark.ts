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

export const changeSchema = z
  .object({
    opId: uuid('The change id'),
    markId: uuid('The mark id'),
    kind: z.enum(['upsert', 'delete']),
    payload: markPayloadSchema.nullable(),
    baseVersion: z.number().int().min(0).optional(),
    queuedAt: z.number().optional(),
  })
  .refine((c) => c.kind === 'delete' || c.payload !== null, { path: ['payload'], message: 'An upsert needs the mark.' });

export const syncSchema = z.object({ changes: z.array(changeSchema).min(1, 'Send at least one change.').max(200, 'Send at most 200 changes at once.') });
export type ChangeInput = z.output<typeof changeSchema>;

export const readParams = z.object({ id: z.coerce.number().int().positive('Unknown read.') });
export const markParams = readParams.extend({ markId: uuid('The mark id') });
export const putMarkSchema = markPayloadSchema.omit({ id: true, version: true }).extend({ opId: uuid('The change id'), baseVersion: z.number().int().min(0).optional() });
export const deleteMarkQuery = z.object({ opId: uuid('The change id'), baseVersion: z.coerce.number().int().min(0).optional() });
export const startReadSchema = z.object({ kind: z.enum([FIRST_READ, SECOND_READ], 'Start a first or a second read here; a settled read is written by settling.') });
