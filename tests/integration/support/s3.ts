import { DeleteObjectCommand, GetObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';

const client = new S3Client({
  region: 'us-east-1',
  endpoint: process.env.S3_ENDPOINT,
  forcePathStyle: true,
  credentials: { accessKeyId: process.env.S3_ACCESS_KEY_ID ?? 'S3RVER', secretAccessKey: process.env.S3_SECRET_ACCESS_KEY ?? 'S3RVER' },
  // As in storage/s3-core.ts: the local fake would otherwise store checksum framing in the body.
  requestChecksumCalculation: 'WHEN_REQUIRED',
  responseChecksumValidation: 'WHEN_REQUIRED',
});

export async function objectKeys(prefix: string): Promise<string[]> {
  const r = await client.send(new ListObjectsV2Command({ Bucket: process.env.S3_BUCKET ?? 'fieldmark', Prefix: prefix }));
  return (r.Contents ?? []).map((o) => o.Key!).sort();
}

export async function getObject(key: string): Promise<Buffer> {
  const r = await client.send(new GetObjectCommand({ Bucket: process.env.S3_BUCKET ?? 'fieldmark', Key: key }));
  return Buffer.from(await r.Body!.transformToByteArray());
}

export async function putObject(key: string, body: Buffer): Promise<void> {
  await client.send(new PutObjectCommand({ Bucket: process.env.S3_BUCKET ?? 'fieldmark', Key: key, Body: body }));
}

export async function removeObject(key: string): Promise<void> {
  await client.send(new DeleteObjectCommand({ Bucket: process.env.S3_BUCKET ?? 'fieldmark', Key: key }));
}

/** Every object in the bucket as `key size etag`, sorted, through every page of the listing. */
export async function objectList(): Promise<string[]> {
  const out: string[] = [];
  let token: string | undefined;
  do {
    const r = await client.send(new ListObjectsV2Command({ Bucket: process.env.S3_BUCKET ?? 'fieldmark', ContinuationToken: token }));
    for (const o of r.Contents ?? []) out.push(`${o.Key} ${o.Size} ${o.ETag}`);
    token = r.IsTruncated ? r.NextContinuationToken : undefined;
  } while (token);
  return out.sort();
}
