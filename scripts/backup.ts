// npm run backup [FOLDER]: a consistent snapshot of the profile's data into FOLDER (default
// backups/<timestamp>): the database dumped by mariadb-dump in one transaction as the schema's
// owner (tables, triggers, routines), every object of the object store, and manifest.json with
// the SHA-256 of each file and each table's row count and CHECKSUM TABLE value. The checksums are
// taken before and after the dump; when writes changed them in between, the dump is taken again
// (up to 3 times) so the manifest describes the dump exactly. Objects are copied after the dump:
// an object the app adds meanwhile may come along unreferenced, and objects are never rewritten.
import { spawn } from 'node:child_process';
import { createWriteStream, mkdirSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Readable } from 'node:stream';
import { GetObjectCommand, ListObjectsV2Command } from '@aws-sdk/client-s3';
import knexFactory from 'knex';
import { knexConfig } from '../knexfile';
import { env } from '../lib/env';
import { clientArgs, DUMP, MANIFEST, type Manifest, objectPath, s3, say, sha256File, tableDifferences, tableStates } from './backup-core';

async function dump(file: string, database: string): Promise<void> {
  const { args, env: childEnv } = clientArgs();
  const child = spawn(
    'mariadb-dump',
    [...args, '--single-transaction', '--quick', '--routines', '--triggers', '--hex-blob', '--no-tablespaces', '--skip-dump-date', database],
    { env: childEnv, stdio: ['ignore', 'pipe', 'pipe'] },
  );
  let err = '';
  child.stderr.on('data', (d) => (err += d));
  const exited = new Promise<number | null>((resolveExit, reject) => {
    child.on('error', reject);
    child.on('close', resolveExit);
  });
  // Both awaited on their own: the file may be finished before or after the process has exited.
  const [, code] = await Promise.all([pipeline(child.stdout, createWriteStream(file)), exited]);
  if (code !== 0) throw new Error(`mariadb-dump failed (exit ${code}): ${err.trim().slice(0, 500)}`);
}

async function main() {
  const e = env();
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const folder = resolve(process.argv[2] && !process.argv[2].startsWith('--') ? process.argv[2] : join('backups', stamp));
  mkdirSync(folder, { recursive: true });
  if (readdirSync(folder).length) throw new Error(`${folder} is not empty; name a new folder`);
  const db = knexFactory({ ...knexConfig(undefined, 'owner'), pool: { min: 0, max: 2 } });
  try {
    const [[{ v: server }]] = await db.raw('SELECT VERSION() AS v');
    let tables: Manifest['database']['tables'] | null = null;
    for (let attempt = 1; attempt <= 3 && !tables; attempt++) {
      const before = await tableStates(db, e.DB_NAME);
      await dump(join(folder, DUMP), e.DB_NAME);
      const after = await tableStates(db, e.DB_NAME);
      const changed = tableDifferences(before, after);
      if (changed.length === 0) tables = after;
      else say(`tables changed during the dump (${changed.join(', ')}); dumping again`);
    }
    if (!tables) throw new Error('the database kept changing during the dump (3 tries); back up at a quieter time or stop the app');

    const client = s3();
    const objects: Manifest['objects'] = [];
    let token: string | undefined;
    do {
      const page = await client.send(new ListObjectsV2Command({ Bucket: e.S3_BUCKET, ContinuationToken: token }));
      for (const o of page.Contents ?? []) {
        const rel = objectPath(o.Key!);
        const file = join(folder, rel);
        mkdirSync(dirname(file), { recursive: true });
        const got = await client.send(new GetObjectCommand({ Bucket: e.S3_BUCKET, Key: o.Key! }));
        await pipeline(got.Body as Readable, createWriteStream(file));
        objects.push({ key: o.Key!, bytes: statSync(file).size, sha256: await sha256File(file), contentType: got.ContentType ?? null });
      }
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (token);

    const files: Manifest['files'] = [{ path: DUMP, bytes: statSync(join(folder, DUMP)).size, sha256: await sha256File(join(folder, DUMP)) }];
    for (const o of objects) files.push({ path: objectPath(o.key), bytes: o.bytes, sha256: o.sha256 });
    const manifest: Manifest = { format: 'fieldmark-backup/1', createdAt: new Date().toISOString(), database: { name: e.DB_NAME, server, tables }, files, objects, bucket: e.S3_BUCKET };
    writeFileSync(join(folder, MANIFEST), JSON.stringify(manifest, null, 2) + '\n');
    const rows = Object.values(tables).reduce((n, t) => n + t.rows, 0);
    say(`backed up ${Object.keys(tables).length} tables (${rows} rows) and ${objects.length} objects (${(objects.reduce((n, o) => n + o.bytes, 0) / 1e6).toFixed(1)} MB) to ${folder}`);
  } finally {
    await db.destroy();
  }
}

// Node exits with 0 when nothing is left to wait for: a promise that never settled would look like success.
let finished = false;
process.on('beforeExit', () => {
  if (finished) return;
  console.error('[fieldmark] backup failed: it stopped before it finished');
  process.exit(1);
});
main()
  .then(() => (finished = true))
  .catch((err) => {
    console.error(`[fieldmark] backup failed: ${err instanceof Error ? err.message : err}`);
    process.exit(1);
  });
