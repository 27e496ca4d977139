// npm run restore FOLDER [--force]: brings a backup (scripts/backup.ts) into this profile's
// database and bucket. Checks every file against the manifest's SHA-256 first and stops on any
// difference; refuses a database that has tables, or a bucket that has objects, unless --force
// (which empties them first). Loads the dump as the schema's owner (triggers included, their
// DEFINER left out so they belong to the account restoring), gives the app account its grants
// again (they live outside the dump), puts every object back, then compares every table's row
// count and CHECKSUM TABLE and every object's SHA-256 with the manifest.
import { spawn } from 'node:child_process';
import { createReadStream, existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { CreateBucketCommand, DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, ListObjectsV2Command, PutObjectCommand } from '@aws-sdk/client-s3';
import knexFactory from 'knex';
import { grantAppAccount } from '../db/grants';
import { knexConfig } from '../knexfile';
import { env } from '../lib/env';
import { clientArgs, DUMP, MANIFEST, type Manifest, objectPath, s3, say, sha256, sha256File, tableDifferences, tableStates } from './backup-core';

/** Drops `DEFINER=…` from the dump's trigger and routine definitions, line by line. */
function withoutDefiners(): Transform {
  let rest = '';
  const strip = (s: string) => s.replace(/\/\*!50017 DEFINER=`[^`]*`@`[^`]*`\s*\*\/\s*/g, '').replace(/\bDEFINER=`[^`]*`@`[^`]*`\s*/g, '');
  return new Transform({
    transform(chunk, _enc, done) {
      const text = rest + chunk.toString('utf8');
      const cut = text.lastIndexOf('\n');
      rest = cut < 0 ? text : text.slice(cut + 1);
      done(null, cut < 0 ? '' : strip(text.slice(0, cut + 1)));
    },
    flush(done) {
      done(null, strip(rest));
    },
  });
}

function load(file: string, database: string): Promise<void> {
  const { args, env: childEnv } = clientArgs();
  return new Promise((resolveLoad, reject) => {
    const child = spawn('mariadb', [...args, database], { env: childEnv, stdio: ['pipe', 'ignore', 'pipe'] });
    let err = '';
    child.stderr.on('data', (d) => (err += d));
    child.on('error', reject);
    child.on('close', (code) => (code === 0 ? resolveLoad() : reject(new Error(`loading the dump failed (exit ${code}): ${err.trim().slice(0, 500)}`))));
    // A client that stops early closes its input: its exit code tells why, not the broken pipe.
    pipeline(createReadStream(file), withoutDefiners(), child.stdin).catch(() => {});
  });
}

async function main() {
  const args = process.argv.slice(2);
  const force = args.includes('--force');
  const folderArg = args.find((a) => !a.startsWith('--'));
  if (!folderArg) throw new Error('usage: npm run restore FOLDER [--force]');
  const folder = resolve(folderArg);
  if (!existsSync(join(folder, MANIFEST))) throw new Error(`${folder} holds no ${MANIFEST}: not a backup folder`);
  const manifest = JSON.parse(readFileSync(join(folder, MANIFEST), 'utf8')) as Manifest;
  if (manifest.format !== 'fieldmark-backup/1') throw new Error(`unknown backup format ${manifest.format}`);

  // Every file as the manifest says, before anything is changed.
  for (const f of manifest.files) {
    const path = join(folder, f.path);
    if (!existsSync(path)) throw new Error(`the backup is incomplete: ${f.path} is missing`);
    const sum = await sha256File(path);
    if (sum !== f.sha256) throw new Error(`the backup is damaged: ${f.path} has SHA-256 ${sum}, the manifest says ${f.sha256}`);
  }
  say(`checked ${manifest.files.length} files against the manifest`);

  const e = env();
  const db = knexFactory({ ...knexConfig(undefined, 'owner'), pool: { min: 0, max: 2 } });
  const client = s3();
  try {
    const [[{ n: tables }]] = await db.raw("SELECT COUNT(*) AS n FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE'", [e.DB_NAME]);
    const existing = async () => {
      const keys: string[] = [];
      let token: string | undefined;
      do {
        const page = await client.send(new ListObjectsV2Command({ Bucket: e.S3_BUCKET, ContinuationToken: token }));
        keys.push(...(page.Contents ?? []).map((o) => o.Key!));
        token = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (token);
      return keys;
    };
    const bucketExists = await client.send(new HeadBucketCommand({ Bucket: e.S3_BUCKET })).then(() => true, () => false);
    const keys = bucketExists ? await existing() : [];
    if ((Number(tables) > 0 || keys.length > 0) && !force) {
      throw new Error(`database ${e.DB_NAME} has ${tables} tables and bucket ${e.S3_BUCKET} ${keys.length} objects: restore refuses to overwrite them (add --force to empty both first)`);
    }
    if (Number(tables) > 0) {
      // The owner may drop and make its own database (services.sh grants it ALL on it).
      await db.raw('DROP DATABASE ??', [e.DB_NAME]);
      await db.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [e.DB_NAME]);
      say(`emptied database ${e.DB_NAME}`);
    }
    for (const k of keys) await client.send(new DeleteObjectCommand({ Bucket: e.S3_BUCKET, Key: k }));
    if (!bucketExists) await client.send(new CreateBucketCommand({ Bucket: e.S3_BUCKET }));

    await load(join(folder, DUMP), e.DB_NAME);
    if (e.DB_USER !== e.DB_OWNER_USER) {
      const n = await grantAppAccount(db, { database: e.DB_NAME, user: e.DB_USER, hosts: e.DB_APP_HOSTS.split(',').map((h) => h.trim()).filter(Boolean) });
      say(`app account ${e.DB_USER}: row access to ${n} table(s) again`);
    }
    for (const o of manifest.objects) {
      const body = readFileSync(join(folder, objectPath(o.key)));
      await client.send(new PutObjectCommand({ Bucket: e.S3_BUCKET, Key: o.key, Body: body, ContentType: o.contentType ?? undefined }));
    }

    // What came back, against the manifest.
    const tablesDiffer = tableDifferences(manifest.database.tables, await tableStates(db, e.DB_NAME));
    const back = new Set(await existing());
    const objectsDiffer: string[] = [];
    for (const o of manifest.objects) {
      if (!back.has(o.key)) {
        objectsDiffer.push(o.key);
        continue;
      }
      const got = await client.send(new GetObjectCommand({ Bucket: e.S3_BUCKET, Key: o.key }));
      if (sha256(await got.Body!.transformToByteArray()) !== o.sha256) objectsDiffer.push(o.key);
    }
    if (tablesDiffer.length || objectsDiffer.length) {
      throw new Error(`restored, but it differs from the manifest: tables ${tablesDiffer.join(', ') || 'none'}; objects ${objectsDiffer.slice(0, 10).join(', ') || 'none'}`);
    }
    say(`restored ${Object.keys(manifest.database.tables).length} tables and ${manifest.objects.length} objects into ${e.DB_NAME} / ${e.S3_BUCKET}; every row count, table checksum and object SHA-256 matches the manifest`);
  } finally {
    await db.destroy();
  }
}

// Node exits with 0 when nothing is left to wait for: a promise that never settled would look like success.
let finished = false;
process.on('beforeExit', () => {
  if (finished) return;
  console.error('[fieldmark] restore failed: it stopped before it finished');
  process.exit(1);
});
main()
  .then(() => (finished = true))
  .catch((err) => {
    console.error(`[fieldmark] restore failed: ${err instanceof Error ? err.message : err}`);
    process.exit(1);
  });
