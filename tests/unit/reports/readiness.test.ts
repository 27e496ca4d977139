import { describe, expect, it } from 'vitest';
import { ApiError } from '@/lib/api/errors';
import { lockRefusal } from '@/lib/reports/lock';
import { readinessToSign, reportBasis, type ReportRead } from '@/lib/reports/readiness';
import { pdfStateOf, reportStatusOf } from '@/lib/reports/status';

const read = (id: number, kind: ReportRead['kind'], status: ReportRead['status'] = 'submitted', readerId = id): ReportRead => ({ id, kind, status, readerId, readerName: `Reader ${readerId}` });
const base = { signedVersion: null, labName: 'Quillfield Equine Reproduction Centre', secondReadRequired: true, disagreements: null, agreementComplete: null };
const codes = (i: Parameters<typeof readinessToSign>[0]) => readinessToSign(i).reasons.map((r) => r.code);

describe('which read a report rests on', () => {
  it('takes the settled read first, then a first read its second read agreed with, then a single read where the lab allows it', () => {
    expect(reportBasis([read(1, 'first'), read(2, 'second'), read(3, 'settled')], { secondReadRequired: true, disagreements: 4 })).toMatchObject({ read: { id: 3 }, basis: 'settled' });
    expect(reportBasis([read(1, 'first'), read(2, 'second')], { secondReadRequired: true, disagreements: 0 })).toMatchObject({ read: { id: 1 }, basis: 'settled' });
    expect(reportBasis([read(1, 'first')], { secondReadRequired: false, disagreements: null })).toMatchObject({ read: { id: 1 }, basis: 'single' });
    expect(reportBasis([read(1, 'first')], { secondReadRequired: true, disagreements: null })).toMatchObject({ basis: 'first-unchecked' });
    expect(reportBasis([read(1, 'first'), read(2, 'second')], { secondReadRequired: false, disagreements: 3 })).toMatchObject({ basis: 'first-unchecked' });
    expect(reportBasis([read(1, 'first', 'open')], { secondReadRequired: false, disagreements: null })).toBeNull();
  });

  it('uses the latest submitted read of a kind (reads are numbered)', () => {
    expect(reportBasis([read(1, 'first'), read(2, 'second'), read(3, 'settled'), read(5, 'settled'), read(6, 'settled', 'open')], { secondReadRequired: true, disagreements: 2 })).toMatchObject({ read: { id: 5 } });
  });
});

describe('readiness to sign', () => {
  it('is ready for a settled collection, and for a single read where the lab allows it', () => {
    expect(readinessToSign({ ...base, reads: [read(1, 'first'), read(2, 'second'), read(3, 'settled')], disagreements: 6, agreementComplete: true })).toEqual({ ready: true, reasons: [] });
    expect(readinessToSign({ ...base, secondReadRequired: false, reads: [read(1, 'first')] }).ready).toBe(true);
  });

  it('names every reason at once', () => {
    expect(codes({ ...base, reads: [] })).toEqual(['no_read']);
    expect(codes({ ...base, reads: [read(1, 'first', 'open')] })).toEqual(['read_open', 'no_read']);
    expect(codes({ ...base, reads: [read(1, 'first')] })).toEqual(['second_read_missing']);
    expect(codes({ ...base, reads: [read(1, 'first'), read(2, 'second', 'open')] })).toEqual(['read_open', 'second_read_missing']);
    expect(codes({ ...base, reads: [read(1, 'first'), read(2, 'second')], disagreements: 3, agreementComplete: true })).toEqual(['disagreements_unsettled']);
    expect(codes({ ...base, reads: [read(1, 'first'), read(2, 'second')], disagreements: 0, agreementComplete: false })).toEqual(['agreement_incomplete']);
    expect(codes({ ...base, signedVersion: 2, labName: ' ', reads: [read(1, 'first'), read(2, 'second'), read(3, 'settled')], disagreements: 1, agreementComplete: true })).toEqual(['already_signed', 'lab_name_missing']);
    expect(readinessToSign({ ...base, reads: [read(1, 'first'), read(2, 'second')], disagreements: 1, agreementComplete: true }).reasons[0]!.message).toBe('1 disagreement between the first and the second read is not settled.');
  });

  it('wants a second read behind a settled read, whatever the lab setting', () => {
    expect(codes({ ...base, secondReadRequired: false, reads: [read(1, 'first'), read(3, 'settled')] })).toEqual(['second_read_missing']);
  });
});

describe('the database’s signed-report lock as an API answer', () => {
  it('maps the lock and frozen-version refusals to 409, and nothing else', () => {
    const signed = lockRefusal({ sqlState: '45000', sqlMessage: 'signed report: the marks of a collection with a signed report cannot change; amend the report first' });
    expect(signed).toBeInstanceOf(ApiError);
    expect([signed!.status, signed!.code]).toEqual([409, 'signed_report']);
    expect(lockRefusal({ sqlState: '45000', sqlMessage: 'frozen report: a signed version never changes' })).toMatchObject({ status: 409, code: 'frozen_report' });
    expect(lockRefusal({ sqlState: '45000', sqlMessage: 'something else' })).toBeNull();
    expect(lockRefusal({ sqlState: '23000', sqlMessage: 'signed report: no' })).toBeNull();
    expect(lockRefusal(new Error('signed report:'))).toBeNull();
    expect(lockRefusal(null)).toBeNull();
  });
});

describe('a version’s state', () => {
  it('is current, amended, then superseded', () => {
    expect(reportStatusOf({ amended_at: null, superseded_by: null })).toBe('current');
    expect(reportStatusOf({ amended_at: new Date(), superseded_by: null })).toBe('amended');
    expect(reportStatusOf({ amended_at: new Date(), superseded_by: 7 })).toBe('superseded');
  });

  it('says whether its PDF is stored, being prepared (with the last failure) or failed, and never silently waits without a job', () => {
    expect(pdfStateOf({ pdf_sha256: 'a'.repeat(64), pdf_bytes: 10, pdf_stored_at: '2026-06-01T10:00:00Z', job_status: 'done' })).toMatchObject({ status: 'stored', sha256: 'a'.repeat(64) });
    expect(pdfStateOf({ pdf_sha256: null, job_status: 'running', job_attempts: 1 })).toEqual({ status: 'preparing', attempts: 1, error: null, retryAt: null });
    expect(pdfStateOf({ pdf_sha256: null, job_status: 'waiting', job_attempts: 1, job_error: 'render failed', job_run_after: '2026-06-01T10:00:10Z' })).toEqual({ status: 'preparing', attempts: 1, error: 'render failed', retryAt: '2026-06-01T10:00:10.000Z' });
    expect(pdfStateOf({ pdf_sha256: null, job_status: 'failed', job_attempts: 4, job_error: 'render failed' })).toEqual({ status: 'failed', attempts: 4, error: 'render failed' });
    expect(pdfStateOf({ pdf_sha256: null, job_status: null })).toMatchObject({ status: 'failed' });
  });
});
