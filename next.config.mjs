import { fileURLToPath } from 'node:url';

/** @type {import('next').NextConfig} */
const nextConfig = {
  // npm test builds into its own folder so it never clobbers the served demo build.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // opencv.js is one 10 MB file with its WebAssembly inside: load it from node_modules, never bundle it.
  serverExternalPackages: ['knex', 'mysql2', 'sharp', 'rate-limiter-flexible', 'nodemailer', '@react-pdf/renderer', '@techstark/opencv-js'],
  turbopack: { root: fileURLToPath(new URL('.', import.meta.url)) },
  poweredByHeader: false,
  experimental: {
    // Field images are streamed by route handlers; server actions take small forms only.
    serverActions: { bodySizeLimit: '1mb' },
  },
};

export default nextConfig;
