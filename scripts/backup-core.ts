// Shared by scripts/backup.ts and scripts/restore.ts: the manifest, the tables' row counts and
// checksums, the object store's client, and SHA-256 of files.
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { S3Client } from '@aws-sdk/client-s3';
import type { Knex } from 'knex';
import { env } from '../lib/env';
import { newS3Client } from '../storage/s3-core';

export const MANIFEST = 'manifest.json';
export const DUMP = 'database.sql';
export const OBJECTS = 'objects';

export interface TableState {
  rows: number;
  /** CHECKSUM TABLE's live checksum of every row (null for an engine without one). */
  checksum: string | null;
}

export interface Manifest {
  format: 'fieldmark-backup/1';
  createdAt: string;
  database: { name: string; server: string; tables: Record<string, TableState> };
  /** The database dump and every object, each with its SHA-256, paths relative to the folder. */
  files: { path: string; bytes: number; sha256: string }[];
  objects: { key: string; bytes: number; sha256: string; contentType: string | null }[];
  bucket: string;
}

export const sha256File = (path: string): Promise<string> =>
  new Promise((resolve, reject) => {
    const h = createHash('sha256');
    createReadStream(path).on('data', (d) => h.update(d)).on('error', reject).on('end', () => resolve(h.digest('hex')));
  });

export const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

/** Every base table of the database with its row count and CHECKSUM TABLE value, by name. */
export async function tableStates(knex: Knex, database: string): Promise<Record<string, TableState>> {
  const [rows] = await knex.raw("SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ? AND table_type = 'BASE TABLE' ORDER BY table_name", [database]);
  const out: Record<string, TableState> = {};
  for (const { name } of rows as { name: string }[]) {
    const id = `\`${database.replace(/`/g, '``')}\`.\`${name.replace(/`/g, '``')}\``;
    const [[count]] = await knex.raw(`SELECT COUNT(*) AS n FROM ${id}`);
    const [[sum]] = await knex.raw(`CHECKSUM TABLE ${id}`);
    out[name] = { rows: Number(count.n), checksum: sum.Checksum === null ? null : String(sum.Checksum) };
  }
  return out;
}

/** Tables whose count or checksum differ between two states (a table missing on either side too). */
export function tableDifferences(a: Record<string, TableState>, b: Record<string, TableState>): string[] {
  const names = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort();
  return names.filter((n) => a[n]?.rows !== b[n]?.rows || a[n]?.checksum !== b[n]?.checksum);
}

export const s3 = (): S3Client => newS3Client();

/** An object key as a relative path inside the backup folder; refuses keys that would leave it. */
export function objectPath(key: string): string {
  const parts = key.split('/');
  if (!key || key.startsWith('/') || parts.some((p) => p === '..' || p === '.' || p === '') || key.includes('\0')) throw new Error(`object key "${key}" cannot be stored as a file; back it up by hand`);
  return `${OBJECTS}/${key}`;
}

/** The owner account's connection options for the mariadb client tools; the password goes in the environment. */
export function clientArgs(): { args: string[]; env: NodeJS.ProcessEnv } {
  const e = env();
  return {
    args: ['--no-defaults', `--host=${e.DB_HOST}`, `--port=${e.DB_PORT}`, `--user=${e.DB_OWNER_USER}`, '--default-character-set=utf8mb4', ...(e.DB_SSL === '1' ? ['--ssl'] : [])],
    env: { ...process.env, MYSQL_PWD: e.DB_OWNER_PASSWORD },
  };
}

export const say = (m: string) => console.log(`[fieldmark] ${m}`);
