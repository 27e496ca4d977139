import { fileURLToPath } from 'node:url';

// On every response, static files included (tests/integration/security/headers.test.ts reads them
// as served). Pages get their Content-Security-Policy, with a fresh nonce, from proxy.ts; JSON and
// file answers from /api never load anything, so theirs allows nothing.
const securityHeaders = [
  { key: 'X-Content-Type-Options', value: 'nosniff' },
  { key: 'Referrer-Policy', value: 'same-origin' },
  { key: 'X-Frame-Options', value: 'DENY' },
  { key: 'Permissions-Policy', value: 'camera=(), microphone=(), geolocation=()' },
];

/** @type {import('next').NextConfig} */
const nextConfig = {
  // npm test builds into its own folder so it never clobbers the served demo build.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // opencv.js is one 10 MB file with its WebAssembly inside: load it from node_modules, never bundle it.
  serverExternalPackages: ['knex', 'mysql2', 'sharp', 'rate-limiter-flexible', 'nodemailer', '@react-pdf/renderer', '@techstark/opencv-js', 'exceljs', 'csv-stringify'],
  turbopack: { root: fileURLToPath(new URL('.', import.meta.url)) },
  poweredByHeader: false,
  experimental: {
    // Field images are streamed by route handlers; server actions take small forms only.
    serverActions: { bodySizeLimit: '1mb' },
  },
  async headers() {
    return [
      { source: '/:path*', headers: securityHeaders },
      { source: '/api/:path*', headers: [{ key: 'Content-Security-Policy', value: "default-src 'none'; frame-ancestors 'none'" }] },
    ];
  },
};

export default nextConfig;
