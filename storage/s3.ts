import 'server-only';

// The app's S3 wrapper; scripts and seeds import ./s3-core directly.
export * from './s3-core';
