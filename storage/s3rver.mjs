// The local S3 fake: s3rver on 127.0.0.1 with the app's bucket and a CORS rule that lets
// the app's own pages (and no other site's) use signed URLs. Production uses a real S3 store.
import S3rver from 's3rver';

const port = Number(process.env.S3_PORT ?? 4569);
const bucket = process.env.S3_BUCKET ?? 'fieldmark';
const appOrigin = new URL(process.env.APP_URL ?? 'http://localhost:3000').origin;
const cors = `<CORSConfiguration>
  <CORSRule>
    <AllowedOrigin>${appOrigin}</AllowedOrigin>
    <AllowedMethod>GET</AllowedMethod><AllowedMethod>PUT</AllowedMethod><AllowedMethod>HEAD</AllowedMethod>
    <AllowedHeader>*</AllowedHeader>
    <ExposeHeader>ETag</ExposeHeader>
    <MaxAgeSeconds>3000</MaxAgeSeconds>
  </CORSRule>
</CORSConfiguration>`;

const server = new S3rver({
  address: '127.0.0.1',
  port,
  silent: true,
  directory: process.env.S3_DIR ?? '.data/dev/s3',
  configureBuckets: [{ name: bucket, configs: [cors] }],
});
await server.run();
console.log(`s3rver on 127.0.0.1:${port}, bucket ${bucket}`);
const stop = async () => { await server.close(); process.exit(0); };
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
