import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { knexConfig } from '@/knexfile';
import { healthEventsCoveringCollection } from '@/db/queries/report-core';
import { exampleReportSnapshot } from '@/lib/reports/fixture';
import { claimPdfJob, completePdfJob, enqueuePdf, processNextPdfJob, sha256Hex, type PdfWorkerDeps } from '@/lib/reports/pdf-jobs';
import { parseReportSnapshot, type ReportSnapshot } from '@/lib/reports/snapshot';
import { newVerificationCode } from '@/lib/reports/verification';
import { LAB_SETTINGS_DEFAULTS } from '@/lib/settings/lab-settings';

/*
 * The PDF render queue and the health-event seam, on a scratch database of their own (migrated to
 * the latest schema as the owner), so the running app's own worker never takes these jobs.
 */
const NAME = `${process.env.DB_NAME ?? 'fieldmark'}_reportqueue`;
let admin: Knex;
let db: Knex;
let ids: { user: number; stallion: number; collection: number };

beforeAll(async () => {
  admin = knexFactory(knexConfig(undefined, 'owner'));
  await admin.raw('DROP DATABASE IF EXISTS ??', [NAME]);
  await admin.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [NAME]);
  db = knexFactory({ ...knexConfig(NAME, 'owner'), pool: { min: 0, max: 6 } });
  await db.migrate.latest();
  const [user] = await db('users').insert({ email: 'queue@quillfield.example', name: 'Queue Vet', role: 'veterinarian' });
  const [client] = await db('clients').insert({ name: 'Queue owner' });
  const [stallion] = await db('stallions').insert({ name: 'Queue stallion', client_id: client });
  const [collection] = await db('collections').insert({ stallion_id: stallion, collected_at: new Date('2026-05-26T07:40:00Z'), recorded_by: user });
  ids = { user, stallion, collection };
}, 120_000);

afterAll(async () => {
  await db?.destroy();
  await admin.raw('DROP DATABASE IF EXISTS ??', [NAME]);
  await admin.destroy();
});

let version = 0;
/** A signed version of the example report, with its job queued (as the signing transaction does). */
async function queuedVersion(): Promise<number> {
  const s = exampleReportSnapshot({ version: 1 });
  const [id] = await db('report_versions').insert({ collection_id: ids.collection, version: ++version, snapshot: JSON.stringify(s), verification_code: newVerificationCode(), signed_by: ids.user, signed_at: new Date() });
  await enqueuePdf(db, id);
  return id;
}

const store = new Map<string, Buffer>();
const fakePdf = (s: ReportSnapshot) => Buffer.from(`%PDF-fake ${s.stallion.name} v${s.report.version}`);
const deps = (over: Partial<PdfWorkerDeps> = {}): PdfWorkerDeps => ({
  db,
  put: async (key, body) => void store.set(key, body),
  render: async (s) => fakePdf(s),
  name: 'test worker',
  options: { leaseMs: 60_000, maxAttempts: 3, retryBaseMs: 50 },
  ...over,
});

beforeEach(async () => {
  await db('report_pdf_jobs').update({ status: 'done' });
  store.clear();
});

describe('the report-PDF queue', () => {
  it('gives each job to one worker: two racing workers store the PDF once', async () => {
    const id = await queuedVersion();
    let renders = 0;
    const worker = deps({ render: async (s) => (renders++, await new Promise((r) => setTimeout(r, 100)), fakePdf(s)) });
    const outcomes = await Promise.all([processNextPdfJob({ ...worker, name: 'a' }), processNextPdfJob({ ...worker, name: 'b' })]);
    expect(outcomes.filter(Boolean)).toEqual([{ reportId: id, outcome: 'done' }]);
    expect(renders).toBe(1);
    const row = await db('report_versions').where({ id }).first('pdf_key', 'pdf_sha256', 'pdf_bytes');
    expect(store.get(row.pdf_key)).toBeDefined();
    expect(row.pdf_sha256).toBe(sha256Hex(store.get(row.pdf_key)!));
    expect(row.pdf_bytes).toBe(store.get(row.pdf_key)!.length);
    expect(await db('report_pdf_jobs').where({ report_id: id }).first('status', 'attempts', 'error')).toEqual({ status: 'done', attempts: 1, error: null });
    expect(await processNextPdfJob(worker)).toBeNull();
  });

  it('retries a failed render after a wait, with the reason kept on the job while it waits, and clears it once stored', async () => {
    const id = await queuedVersion();
    let calls = 0;
    const flaky = deps({ render: async (s) => (++calls === 1 ? Promise.reject(new Error('font file unreadable')) : fakePdf(s)) });
    expect(await processNextPdfJob(flaky)).toEqual({ reportId: id, outcome: 'retry' });
    const waiting = await db('report_pdf_jobs').where({ report_id: id }).first('status', 'attempts', 'error', 'run_after');
    expect(waiting).toMatchObject({ status: 'waiting', attempts: 1, error: 'The PDF could not be rendered: font file unreadable' });
    expect(new Date(waiting.run_after).getTime()).toBeGreaterThan(Date.now() - 1000);
    await new Promise((r) => setTimeout(r, 120));
    expect(await processNextPdfJob(flaky)).toEqual({ reportId: id, outcome: 'done' });
    expect(await db('report_pdf_jobs').where({ report_id: id }).first('status', 'attempts', 'error')).toEqual({ status: 'done', attempts: 2, error: null });
  });

  it('fails for good after the last attempt, visibly, until it is queued again', async () => {
    const id = await queuedVersion();
    const broken = deps({ render: async () => Promise.reject(new Error('out of memory')) });
    const outcomes: string[] = [];
    for (let i = 0; i < 3; i++) {
      const o = await processNextPdfJob(broken);
      outcomes.push(o!.outcome);
      await new Promise((r) => setTimeout(r, 250));
    }
    expect(outcomes).toEqual(['retry', 'retry', 'failed']);
    expect(await db('report_pdf_jobs').where({ report_id: id }).first('status', 'attempts', 'error')).toEqual({ status: 'failed', attempts: 3, error: 'The PDF could not be rendered: out of memory' });
    expect(await processNextPdfJob(broken)).toBeNull();
    expect((await db('report_versions').where({ id }).first('pdf_sha256')).pdf_sha256).toBeNull();
    await enqueuePdf(db, id);
    expect(await processNextPdfJob(deps())).toEqual({ reportId: id, outcome: 'done' });
  });

  it('gives a job whose lease ran out to another worker; the first writes nothing', async () => {
    const id = await queuedVersion();
    const slow = await claimPdfJob(db, 'slow', { leaseMs: 50 });
    expect(slow).toMatchObject({ id, attempts: 1 });
    await new Promise((r) => setTimeout(r, 120));
    expect(await processNextPdfJob(deps({ name: 'second' }))).toEqual({ reportId: id, outcome: 'done' });
    const row = await db('report_versions').where({ id }).first('pdf_key', 'pdf_sha256');
    expect(await completePdfJob(db, slow!, { key: 'lost/key.pdf', sha256: '0'.repeat(64), bytes: 1, ms: 1 })).toBe(false);
    expect(await db('report_versions').where({ id }).first('pdf_key', 'pdf_sha256')).toEqual(row);
    expect((await db('report_pdf_jobs').where({ report_id: id }).first('attempts')).attempts).toBe(2);
  });

  it('refuses a snapshot it cannot read at once, with the reason', async () => {
    // A stored row that no longer fits the schema (as damage or a future version would leave it).
    const [id] = await db('report_versions').insert({ collection_id: ids.collection, version: ++version, snapshot: JSON.stringify({ schemaVersion: 99 }), verification_code: newVerificationCode(), signed_by: ids.user, signed_at: new Date() });
    await enqueuePdf(db, id);
    expect(await processNextPdfJob(deps())).toEqual({ reportId: id, outcome: 'failed' });
    expect((await db('report_pdf_jobs').where({ report_id: id }).first('error')).error).toMatch(/^The signed snapshot cannot be read: The stored report has schemaVersion 99/);
  });

  it('renders the real example the same way every time (deterministic bytes)', async () => {
    const { renderReportPdf } = await import('@/lib/reports/pdf/render');
    const s = parseReportSnapshot(exampleReportSnapshot());
    const [a, b] = [await renderReportPdf(s, { appUrl: 'https://reports.quillfield.example' }), await renderReportPdf(s, { appUrl: 'https://reports.quillfield.example' })];
    expect(sha256Hex(a)).toBe(sha256Hex(b));
  }, 60_000);
});

describe('health events whose window covers the collection (the seam for the stallion-history feature)', () => {
  const settings = { ...LAB_SETTINGS_DEFAULTS, timeZone: 'Europe/London' };

  it('are read from the migrated table, with the collection’s day of each window, and only those covering it', async () => {
    await db('health_events').insert([
      { stallion_id: ids.stallion, kind: 'fever', started_on: '2026-05-04', ended_on: '2026-05-06', peak_temperature_c: 39.8, notes: 'Off feed for two days', recorded_by: ids.user },
      { stallion_id: ids.stallion, kind: 'injury', started_on: '2026-01-02', ended_on: null, peak_temperature_c: null, notes: null, recorded_by: ids.user },
    ]);
    const events = await healthEventsCoveringCollection(db, { stallionId: ids.stallion, collectedAt: '2026-05-26T07:40:00.000Z' }, settings);
    // 4 May is day 1, so 26 May is day 23. The window runs 57 + 10 days from the event's last day
    // (6 May), so it lasts 2 + 67 = 69 days and clears on 12 July; the injury's window (2 Jan + 67
    // days) cleared on 10 March. Counted by hand on a calendar (common practice: 57 days'
    // spermatogenesis plus 10 days' epididymal transit, the lab settings' defaults).
    expect(events).toEqual([{ kind: 'Fever', description: 'Peak temperature 39.8 °C — Off feed for two days', startedOn: '2026-05-04', endedOn: '2026-05-06', dayOfWindow: 23, windowDays: 69, windowClearsOn: '2026-07-12' }]);
  });
});
