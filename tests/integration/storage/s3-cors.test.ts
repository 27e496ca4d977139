import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb } from '../support/db';
import { APP_URL } from '../support/http';

afterAll(closeTestDb);

// The local S3 fake answers browsers from the app's own origin only (storage/s3rver.mjs).
const S3 = `${process.env.S3_ENDPOINT}/${process.env.S3_BUCKET ?? 'fieldmark'}`;
const APP_ORIGIN = new URL(APP_URL).origin;

describe('S3 fake CORS', () => {
  it('lets only the app\'s origin read and write from a browser', async () => {
    const preflight = (origin: string) => fetch(`${S3}/cors-check.jpg`, { method: 'OPTIONS', headers: { origin, 'access-control-request-method': 'PUT' } });
    expect((await preflight('https://evil.example')).status).toBe(403);
    expect((await preflight(APP_ORIGIN)).status).toBe(200);

    const { thumb_key: key } = await testDb()('field_images').first('thumb_key');
    const read = (origin: string) => fetch(`${S3}/${key}`, { headers: { origin } });
    const foreign = await read('https://evil.example');
    expect(foreign.headers.get('access-control-allow-origin')).toBeNull();
    const own = await read(APP_ORIGIN);
    expect(own.headers.get('access-control-allow-origin')).toBe(APP_ORIGIN);
  });
});
