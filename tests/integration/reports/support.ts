import { createHash } from 'node:crypto';
import { expect } from 'vitest';
import { buildReportCollection, type BuiltCollection, type ReadsState } from '../../support/report-collections';
import { testDb } from '../support/db';
import { DEMO_PASSWORD, type Session } from '../support/http';

/** A JSON column as mysql2 hands it back (parsed or as text). */
export const json = (v: unknown): any => (typeof v === 'string' ? JSON.parse(v) : v);

export const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

export function built(reads: ReadsState, opts: Omit<Parameters<typeof buildReportCollection>[1], 'reads'> = {}): Promise<BuiltCollection> {
  return buildReportCollection(testDb(), { reads, ...opts });
}

/** Signs as the session's veterinarian; the answer as it comes. */
export function sign(vet: Session, collectionId: number, body: Record<string, unknown> = {}) {
  return vet.json(`/api/collections/${collectionId}/report/sign`, 'POST', { password: DEMO_PASSWORD, ...body });
}

/** Signs and expects it to work; the signed version. */
export async function signed(vet: Session, collectionId: number, body: Record<string, unknown> = {}) {
  const r = await sign(vet, collectionId, body);
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return r.body.report as { id: number; version: number; verificationCode: string; snapshot: any; pdf: { status: string } };
}

/** Waits until the background render has stored the version's PDF; its state. */
export async function pdfStored(s: Session, reportId: number, timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const r = await s.json(`/api/reports/${reportId}`);
    expect(r.status).toBe(200);
    const pdf = r.body.report.pdf;
    if (pdf.status === 'stored') return pdf as { status: 'stored'; sha256: string; bytes: number };
    if (pdf.status === 'failed') throw new Error(`PDF failed: ${pdf.error}`);
    if (Date.now() > until) throw new Error(`PDF of report ${reportId} not stored within ${timeoutMs} ms`);
    await new Promise((res) => setTimeout(res, 300));
  }
}

/** The PDF's bytes as the route serves them. */
export async function pdfBytes(s: Session, reportId: number): Promise<{ status: number; bytes: Buffer; headers: Headers }> {
  const res = await s.fetch(`/api/reports/${reportId}/pdf`);
  return { status: res.status, bytes: Buffer.from(await res.arrayBuffer()), headers: res.headers };
}
