import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { GetObjectCommand, ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type Manifest, sha256, tableStates } from '../../../scripts/backup-core';

// npm run backup on the test profile's demo, npm run restore into a scratch profile of its own
// (own ports, data folder, database and bucket), and everything compared.
// In the profile's own data folder (npm test starts it empty), not the machine's shared /tmp.
const dir = mkdtempSync(join(process.env.DATA_DIR ?? tmpdir(), 'backup-test-'));
const backup = join(dir, 'snapshot');
// Ports a fixed step above this run's own (services.test.ts uses +5), so nothing collides.
const near = (name: string, fallback: number) => String(Number(process.env[name] ?? fallback) + 6);
const scratch = {
  ...process.env,
  FIELDMARK_PROFILE: 'scratch',
  DATA_DIR: join(dir, 'data'),
  DB_PORT: near('DB_PORT', 3417),
  S3_PORT: near('S3_PORT', 4579),
  SMTP_PORT: near('SMTP_PORT', 1035),
  MAIL_WEB_PORT: near('MAIL_WEB_PORT', 1090),
  PORT: near('PORT', 3100),
  S3_ENDPOINT: `http://127.0.0.1:${near('S3_PORT', 4579)}`,
  MAIL_WEB_URL: `http://127.0.0.1:${near('MAIL_WEB_PORT', 1090)}`,
};
// Same database and bucket names in both profiles; the ports and data folders tell them apart.
const DB_NAME = process.env.DB_NAME ?? 'fieldmark';
const run = (cmd: string[], env: NodeJS.ProcessEnv = process.env) => spawnSync('bash', cmd, { env, encoding: 'utf8', timeout: 120_000 });
const services = (cmd: string) => run(['scripts/services.sh', cmd], scratch);
const script = (name: string, args: string[], env: NodeJS.ProcessEnv) => run(['scripts/with-env.sh', 'npx', 'tsx', `scripts/${name}.ts`, ...args], env);

const conn = (env: NodeJS.ProcessEnv, account: 'owner' | 'app') =>
  knexFactory({
    client: 'mysql2',
    connection: {
      host: '127.0.0.1', port: Number(env.DB_PORT), database: DB_NAME,
      user: account === 'owner' ? (env.DB_OWNER_USER ?? 'fieldmark_owner') : (env.DB_USER ?? 'fieldmark'),
      password: account === 'owner' ? (env.DB_OWNER_PASSWORD ?? 'fieldmark-owner-local') : (env.DB_PASSWORD ?? 'fieldmark-local'),
    },
    pool: { min: 0, max: 2 },
  });

let source: Knex;
let restoredOwner: Knex;
let restoredApp: Knex;
beforeAll(() => {
  source = conn(process.env, 'owner');
  restoredOwner = conn(scratch, 'owner');
  restoredApp = conn(scratch, 'app');
});
afterAll(async () => {
  await Promise.all([source?.destroy(), restoredOwner?.destroy(), restoredApp?.destroy()]);
  services('stop');
  rmSync(dir, { recursive: true, force: true });
});

async function objectsOf(env: NodeJS.ProcessEnv): Promise<Map<string, string>> {
  const client = new S3Client({
    region: 'us-east-1', endpoint: env.S3_ENDPOINT, forcePathStyle: true,
    credentials: { accessKeyId: env.S3_ACCESS_KEY_ID ?? 'S3RVER', secretAccessKey: env.S3_SECRET_ACCESS_KEY ?? 'S3RVER' },
    requestChecksumCalculation: 'WHEN_REQUIRED', responseChecksumValidation: 'WHEN_REQUIRED',
  });
  const out = new Map<string, string>();
  let token: string | undefined;
  do {
    const page = await client.send(new ListObjectsV2Command({ Bucket: env.S3_BUCKET ?? 'fieldmark', ContinuationToken: token }));
    for (const o of page.Contents ?? []) {
      const got = await client.send(new GetObjectCommand({ Bucket: env.S3_BUCKET ?? 'fieldmark', Key: o.Key! }));
      out.set(o.Key!, sha256(await got.Body!.transformToByteArray()));
    }
    token = page.IsTruncated ? page.NextContinuationToken : undefined;
  } while (token);
  return out;
}

describe('backup and restore', { timeout: 180_000 }, () => {
  let manifest: Manifest;

  it('backs up the demo: a dump, every object, and a manifest of checksums', async () => {
    const r = script('backup', [backup], process.env);
    expect(r.status, r.stderr + r.stdout).toBe(0);
    expect(r.stdout).toMatch(/backed up \d+ tables/);
    manifest = JSON.parse(readFileSync(join(backup, 'manifest.json'), 'utf8'));
    // The manifest describes the live demo: tables, rows and objects.
    const live = await tableStates(source, DB_NAME);
    expect(Object.keys(manifest.database.tables).sort()).toEqual(Object.keys(live).sort());
    expect(manifest.database.tables.users!.rows).toBeGreaterThan(0);
    expect(manifest.database.tables.marks!.rows).toBeGreaterThan(0);
    const objects = await objectsOf(process.env);
    for (const o of manifest.objects) expect(objects.get(o.key), o.key).toBe(o.sha256);
    expect(manifest.objects.length).toBeGreaterThan(0);
    expect(manifest.files.map((f) => f.path)).toContain('database.sql');
  });

  it('restores into an empty profile: every table, row count, checksum and object the same', async () => {
    const up = services('start');
    expect(up.status, up.stderr).toBe(0);
    const r = script('restore', [backup], scratch);
    expect(r.status, r.stderr + r.stdout).toBe(0);
    expect(r.stdout).toMatch(/every row count, table checksum and object SHA-256 matches/);
    // Compared here too, by this test's own connection and client.
    const restored = await tableStates(restoredOwner, DB_NAME);
    expect(restored).toEqual(manifest.database.tables);
    const objects = await objectsOf(scratch);
    expect(new Map(manifest.objects.map((o) => [o.key, o.sha256]))).toEqual(objects);
  });

  it('brings back the signed-report lock triggers and the app account’s grants', async () => {
    const triggers = (k: Knex, db: string) => k('information_schema.triggers').where({ trigger_schema: db }).orderBy('trigger_name').pluck('trigger_name');
    const want = await triggers(source, DB_NAME);
    expect(want.length).toBeGreaterThan(0);
    expect(await triggers(restoredOwner, DB_NAME)).toEqual(want);
    // As the app account: rows readable, a signed collection's marks refused by the database.
    const signed = await restoredApp('collections').whereNotNull('signed_report_id').first('id');
    expect(signed, 'the demo has a signed report').toBeTruthy();
    const read = await restoredApp('reads').where({ collection_id: signed.id }).first('id');
    await expect(restoredApp('marks').where({ read_id: read.id }).update({ x: 1 })).rejects.toThrow(/signed report/);
    // The audit log stays append-only for the app.
    await expect(restoredApp('audit_log').delete()).rejects.toThrow(/command denied/);
    await expect(restoredApp.raw('DROP TABLE marks')).rejects.toThrow(/command denied/);
  });

  it('refuses a non-empty database without --force, and a damaged backup before changing anything', async () => {
    const again = script('restore', [backup], scratch);
    expect(again.status).toBe(1);
    expect(again.stderr).toMatch(/refuses to overwrite/);
    const before = await tableStates(restoredOwner, DB_NAME);
    const victim = manifest.objects[0]!;
    const file = join(backup, 'objects', victim.key);
    writeFileSync(file, Buffer.concat([readFileSync(file), Buffer.from('x')]));
    const damaged = script('restore', [backup, '--force'], scratch);
    expect(damaged.status).toBe(1);
    expect(damaged.stderr).toContain(`the backup is damaged: objects/${victim.key}`);
    expect(await tableStates(restoredOwner, DB_NAME)).toEqual(before);
  });
});
