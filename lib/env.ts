import { z } from 'zod';

// Checked once, at first use; scripts/env.sh gives every variable a local default (and makes the
// session secret in the profile's data folder). lib/config/production.ts says what a production start insists on.
const schema = z.object({
  DB_HOST: z.string().default('127.0.0.1'),
  DB_PORT: z.coerce.number().int().positive().default(3407),
  DB_NAME: z.string().default('fieldmark'),
  DB_USER: z.string().default('fieldmark'),
  DB_PASSWORD: z.string().default('fieldmark-local'),
  /** The account that owns the schema: migrations, seeds and the app account's grants run as it. */
  DB_OWNER_USER: z.string().default('fieldmark_owner'),
  DB_OWNER_PASSWORD: z.string().default('fieldmark-owner-local'),
  /** Hosts the app account connects from, for the grants made after migrating (comma-separated). */
  DB_APP_HOSTS: z.string().default('127.0.0.1,localhost'),
  DB_SSL: z.enum(['0', '1']).default('0'),
  DB_POOL_MAX: z.coerce.number().int().min(2).max(500).default(40),
  S3_ENDPOINT: z.string().optional(),
  S3_PUBLIC_ENDPOINT: z.string().optional(),
  S3_BUCKET: z.string().default('fieldmark'),
  S3_REGION: z.string().default('us-east-1'),
  S3_ACCESS_KEY_ID: z.string().default('S3RVER'),
  S3_SECRET_ACCESS_KEY: z.string().default('S3RVER'),
  SMTP_HOST: z.string().default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().positive().default(1025),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  SMTP_SECURE: z.enum(['0', '1']).default('0'),
  MAIL_FROM: z.string().default('Fieldmark <no-reply@fieldmark.local>'),
  APP_URL: z.string().default('http://localhost:3000'),
  // No default: a secret written in the source signs sessions anyone can forge.
  NEXTAUTH_SECRET: z.string().min(16).optional(),
  /** How many reverse proxies in front of the app to believe in X-Forwarded-For (0: the socket's address). */
  TRUST_PROXY: z.coerce.number().int().min(0).max(10).default(0),
  /** JSON request bodies above this are refused with 413 before they are parsed. */
  JSON_BODY_LIMIT_KB: z.coerce.number().int().min(16).max(65536).default(1024),
  // The candidate-detection worker every instance's worker process runs (lib/workers/instance.ts).
  CANDIDATE_WORKER: z.enum(['0', '1']).default('1'),
  CANDIDATE_POLL_MS: z.coerce.number().int().min(50).max(600_000).default(2000),
  CANDIDATE_LEASE_MS: z.coerce.number().int().min(1000).max(3_600_000).default(120_000),
  CANDIDATE_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(20).default(3),
  CANDIDATE_RETRY_MS: z.coerce.number().int().min(10).max(3_600_000).default(30_000),
  /** Signed-report PDFs are rendered by a worker in every instance (lib/reports/pdf-jobs.ts); 0 leaves this one out. */
  REPORT_PDF_WORKER: z.enum(['0', '1']).default('1'),
  REPORT_PDF_POLL_MS: z.coerce.number().int().min(100).max(600_000).default(2000),
  REPORT_PDF_LEASE_MS: z.coerce.number().int().min(5000).max(3_600_000).default(120_000),
  REPORT_PDF_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(50).default(4),
  REPORT_PDF_RETRY_MS: z.coerce.number().int().min(100).max(3_600_000).default(10_000),
});

export type Env = z.infer<typeof schema>;
let cached: Env | undefined;

export function env(): Env {
  if (!cached) {
    const parsed = schema.safeParse(process.env);
    if (!parsed.success) {
      const fields = parsed.error.issues.map((i) => i.path.join('.')).join(', ');
      throw new Error(`Invalid environment variables: ${fields} (see .env.example)`);
    }
    cached = parsed.data;
  }
  return cached;
}

/** The session secret; there is no fallback, so a missing one stops the request instead of signing with a known value. */
export function sessionSecret(): string {
  const secret = env().NEXTAUTH_SECRET;
  if (!secret) throw new Error('NEXTAUTH_SECRET is not set: start the app with `npm start` (it keeps one in .data/<profile>/) or set it (see README, Configuration).');
  return secret;
}
