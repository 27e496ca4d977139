import type { Knex } from 'knex';

// The database's state as row counts and CHECKSUM TABLE per table, to show a run of refused
// requests changed nothing.

/**
 * Tables left out of the comparison, and why:
 * - sign_in_limits: the sign-in limiter's counters; a refused sign-in (or a wrong sign-off password) is counted on purpose.
 * - audit_log: compared apart (auditSince): a refusal may be recorded, nothing else may.
 * - candidate_jobs, report_pdf_jobs: the instance's background workers lease, retry and finish jobs on their
 *   own clock; only their row counts are compared (a job row is only added with a new image or a new signed version).
 * - candidates: the cells a detection job found, written by the worker when a job (queued before) finishes.
 */
export const CHANGES_ON_ITS_OWN = ['sign_in_limits', 'audit_log', 'candidate_jobs', 'candidates', 'report_pdf_jobs'];
export const COUNTED_ONLY = ['candidate_jobs', 'report_pdf_jobs'];

export type DbState = { tables: Record<string, string>; auditMaxId: number };

export async function dbState(db: Knex): Promise<DbState> {
  const [rows] = (await db.raw("SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' ORDER BY table_name")) as [{ t: string }[]];
  const tables: Record<string, string> = {};
  for (const { t } of rows) {
    if (CHANGES_ON_ITS_OWN.includes(t) && !COUNTED_ONLY.includes(t)) continue;
    const [[{ n }]] = (await db.raw('SELECT COUNT(*) AS n FROM ??', [t])) as [{ n: number }[]];
    if (COUNTED_ONLY.includes(t)) {
      tables[t] = `${n} rows`;
      continue;
    }
    const [[sum]] = (await db.raw('CHECKSUM TABLE ??', [t])) as [{ Checksum: number | null }[]];
    tables[t] = `${n} rows, checksum ${sum?.Checksum}`;
  }
  const [[{ m }]] = (await db.raw('SELECT COALESCE(MAX(id), 0) AS m FROM audit_log')) as [{ m: number }[]];
  return { tables, auditMaxId: Number(m) };
}

/** Audit rows written after a state was taken (action and entity). */
export async function auditSince(db: Knex, state: DbState): Promise<{ action: string; entity: string }[]> {
  return db('audit_log').where('id', '>', state.auditMaxId).select('action', 'entity');
}

/** Waits until no background job is running or due (so the workers leave the tables alone while we compare). */
export async function jobsIdle(db: Knex, timeoutMs = 60_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const busy = async (t: string) =>
      Number((await db(t).where((q) => q.where('status', 'running').orWhere((w) => w.where('status', 'waiting').where('run_after', '<=', db.fn.now(3)))).count({ n: '*' }))[0]!.n);
    if ((await busy('candidate_jobs')) + (await busy('report_pdf_jobs')) === 0) return;
    if (Date.now() > until) throw new Error('background jobs still running; the database would change under the comparison');
    await new Promise((r) => setTimeout(r, 300));
  }
}
