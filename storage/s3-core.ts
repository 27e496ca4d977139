// Usable from scripts and seeds too; storage/s3.ts is the server-only entry for the app.
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  PutObjectCommand,
  S3Client,
} from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';
import type { Readable } from 'node:stream';
import { env } from '@/lib/env';

const globalForS3 = globalThis as unknown as { fieldmarkS3?: S3Client };

/** A client for the configured store (the app keeps one; scripts such as the backup make their own). */
export function newS3Client(): S3Client {
  const e = env();
  return new S3Client({
    region: e.S3_REGION,
    endpoint: e.S3_ENDPOINT || undefined,
    forcePathStyle: Boolean(e.S3_ENDPOINT),
    credentials: { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY },
    // Without these the SDK frames streamed bodies in a way the local fake stores verbatim.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
}

function client(): S3Client {
  globalForS3.fieldmarkS3 ??= newS3Client();
  return globalForS3.fieldmarkS3;
}

const bucket = () => env().S3_BUCKET;

/** Store an object; streams are sent in parts, so a large file never sits whole in memory. */
export async function put(key: string, body: Buffer | Readable, contentType: string): Promise<void> {
  if (Buffer.isBuffer(body)) {
    await client().send(new PutObjectCommand({ Bucket: bucket(), Key: key, Body: body, ContentType: contentType }));
    return;
  }
  await new Upload({ client: client(), params: { Bucket: bucket(), Key: key, Body: body, ContentType: contentType } }).done();
}

export async function get(key: string): Promise<{ body: Readable; contentType?: string; contentLength?: number }> {
  const r = await client().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
  return { body: r.Body as Readable, contentType: r.ContentType, contentLength: r.ContentLength };
}

export async function getBuffer(key: string): Promise<Buffer> {
  const { body } = await get(key);
  const chunks: Buffer[] = [];
  for await (const c of body) chunks.push(Buffer.from(c));
  return Buffer.concat(chunks);
}

export async function remove(key: string): Promise<void> {
  await client().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key }));
}

export async function signedUrl(key: string, seconds = 300): Promise<string> {
  return getSignedUrl(client(), new GetObjectCommand({ Bucket: bucket(), Key: key }), { expiresIn: seconds });
}

export async function ping(): Promise<boolean> {
  try {
    await client().send(new HeadBucketCommand({ Bucket: bucket() }));
    return true;
  } catch {
    return false;
  }
}
