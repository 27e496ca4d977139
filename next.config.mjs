import { fileURLToPath } from 'node:url';

/** @type {import('next').NextConfig} */
const nextConfig = {
  // npm test builds into its own folder so it never clobbers the served demo build.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  serverExternalPackages: ['knex', 'mysql2', 'sharp', 'rate-limiter-flexible', 'nodemailer', '@react-pdf/renderer', 'exceljs', 'csv-stringify'],
  turbopack: { root: fileURLToPath(new URL('.', import.meta.url)) },
  poweredByHeader: false,
  experimental: {
    // Field images are streamed by route handlers; server actions take small forms only.
    serverActions: { bodySizeLimit: '1mb' },
  },
};

export default nextConfig;
