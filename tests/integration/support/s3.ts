import { ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';

const client = new S3Client({
  region: 'us-east-1',
  endpoint: process.env.S3_ENDPOINT,
  forcePathStyle: true,
  credentials: { accessKeyId: process.env.S3_ACCESS_KEY_ID ?? 'S3RVER', secretAccessKey: process.env.S3_SECRET_ACCESS_KEY ?? 'S3RVER' },
});

export async function objectKeys(prefix: string): Promise<string[]> {
  const r = await client.send(new ListObjectsV2Command({ Bucket: process.env.S3_BUCKET ?? 'fieldmark', Prefix: prefix }));
  return (r.Contents ?? []).map((o) => o.Key!).sort();
}
