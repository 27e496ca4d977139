// What a production start insists on. Pure: takes the environment as a plain object, so the
// app's start-up check, the start script and the tests share one rule.

/** Values the project ships for local work: anyone can read them here, so they protect nothing. */
export const BUILT_IN = {
  /** The session secret older checkouts defaulted to; a token signed with it must never be accepted. */
  NEXTAUTH_SECRET: 'local-development-secret-change-me-in-production',
  DB_PASSWORD: 'fieldmark-local',
  DB_OWNER_PASSWORD: 'fieldmark-owner-local',
  S3_SECRET_ACCESS_KEY: 'S3RVER',
} as const;

/** 32 random bytes is the floor for an HMAC/encryption key; scripts/env.sh makes 48. */
export const MIN_SECRET_LENGTH = 32;

type Env = Record<string, string | undefined>;

const LOCAL_HOSTS = new Set(['localhost', '127.0.0.1', '[::1]', '::1']);

function isLocalUrl(value: string | undefined): boolean {
  if (!value) return true;
  try {
    return LOCAL_HOSTS.has(new URL(value).hostname);
  } catch {
    return false;
  }
}

/**
 * A production start: FIELDMARK_PRODUCTION=1, or NODE_ENV=production serving a public address.
 * `npm start` on a laptop (production build, APP_URL on localhost) is not one.
 */
export function isProductionStart(e: Env): boolean {
  return e.FIELDMARK_PRODUCTION === '1' || (e.NODE_ENV === 'production' && !isLocalUrl(e.APP_URL));
}

/**
 * Why this environment may not serve a production start, one sentence per problem, each naming
 * the variable to set. The app needs its own account, the session secret and the object store;
 * migrations need the owner account's password, which the app never needs.
 */
export function productionProblems(e: Env, scope: { app?: boolean; migrations?: boolean } = { app: true }): string[] {
  const problems: string[] = [];
  if (scope.migrations && (!e.DB_OWNER_PASSWORD || e.DB_OWNER_PASSWORD === BUILT_IN.DB_OWNER_PASSWORD)) {
    problems.push('DB_OWNER_PASSWORD is missing or the built-in local password: set the password of the database account that owns the schema.');
  }
  if (!scope.app) return problems;
  const secret = e.NEXTAUTH_SECRET;
  if (!secret) problems.push('NEXTAUTH_SECRET is not set: set it to a long random value (e.g. `openssl rand -base64 48`), the same on every instance.');
  else if (secret === BUILT_IN.NEXTAUTH_SECRET) problems.push('NEXTAUTH_SECRET is the built-in development value: set it to a long random value of your own.');
  else if (secret.length < MIN_SECRET_LENGTH) problems.push(`NEXTAUTH_SECRET is too short (${secret.length} characters): set it to at least ${MIN_SECRET_LENGTH} random characters.`);
  if (!e.DB_PASSWORD || e.DB_PASSWORD === BUILT_IN.DB_PASSWORD) problems.push('DB_PASSWORD is missing or the built-in local password: set the password of the database account the app runs as.');
  if (!e.S3_SECRET_ACCESS_KEY || e.S3_SECRET_ACCESS_KEY === BUILT_IN.S3_SECRET_ACCESS_KEY) {
    problems.push('S3_SECRET_ACCESS_KEY is missing or the local fake\'s key: set the object store\'s secret key (and S3_ACCESS_KEY_ID).');
  }
  if (!e.APP_URL) problems.push('APP_URL is not set: set it to the public address people open, e.g. https://fieldmark.example-lab.org.');
  return problems;
}

/** The message a refused start prints. */
export function refusalMessage(problems: string[]): string {
  return ['Fieldmark refuses to start in production:', ...problems.map((p) => `  - ${p}`), 'See "Configuration" in README.md.'].join('\n');
}
