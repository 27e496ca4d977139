import { z } from 'zod';
import { SETTLE_DECISIONS } from '@/lib/settling/settle';

const uuid = z.string().regex(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/i, 'The decision id must be a UUID v4 made by the browser.');

/** One decision on one disagreement (POST /api/collections/{id}/settle). */
export const decisionSchema = z
  .object({
    opId: uuid,
    // imageId:firstMarkId:secondMarkId, one side empty for a cell only one reader marked.
    key: z.string().regex(/^\d+:[0-9a-f-]{0,36}:[0-9a-f-]{0,36}$/i, 'The disagreement key must be imageId:firstMarkId:secondMarkId, as the settle state gives it.'),
    decision: z.enum(SETTLE_DECISIONS, { error: `The decision must be one of ${SETTLE_DECISIONS.join(', ')}.` }),
    classKey: z.string().min(1).max(40).nullable().optional(),
  })
  .refine((d) => d.decision !== 'other' || Boolean(d.classKey), { path: ['classKey'], message: 'Another class needs its class key.' })
  .refine((d) => d.decision === 'other' || !d.classKey, { path: ['classKey'], message: 'Only “other” takes a class key; leave it out.' });

export const decisionsSchema = z.object({
  decisions: z.array(decisionSchema).min(1, 'Send at least one decision.').max(200, 'Send at most 200 decisions at once.'),
});
export type DecisionsBody = z.output<typeof decisionsSchema>;
