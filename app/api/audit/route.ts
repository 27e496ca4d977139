import { listAudit } from '@/db/queries/audit-log';
import { route } from '@/lib/api/handler';
import { auditQuery } from '@/lib/validations/audit';

/** The audit log, for the lab manager: newest first, paged on the server, filtered by person, record type, record and date. */
export const GET = route({ roles: ['lab_manager'], query: auditQuery }, async ({ user, query }) => listAudit(user, query));
