import { z } from 'zod';
import { listQuery } from './fields';

const day = z.iso.date({ message: 'Enter a date as YYYY-MM-DD.' });

/** GET /api/audit: the lab manager's audit log, newest first, filtered by person, record type, record and the lab's days. */
export const auditQuery = listQuery(['createdAt'] as const, 'createdAt', 'desc').extend({
  userId: z.coerce.number().int().positive().optional(),
  entity: z.string().trim().regex(/^[a-z_]{1,40}$/, 'Choose a record type from the list.').optional(),
  entityId: z.string().trim().max(64).optional(),
  from: day.optional(),
  to: day.optional(),
});
export type AuditQuery = z.infer<typeof auditQuery>;
