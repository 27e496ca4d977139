import 'server-only';
import { RateLimiterMySQL, RateLimiterRes } from 'rate-limiter-flexible';
import { db } from '@/db/knex';
import { env } from '@/lib/env';

/**
 * The public verification page answers anyone, so it is counted per client address in MariaDB
 * (the sign-in limits' store, its own key prefix): 30 look-ups in 10 minutes. With 95 random bits
 * a code cannot be guessed anyway; the limit keeps the page from being used to try.
 */
export const VERIFY_LIMIT = { keyPrefix: 'verify', points: 30, duration: 10 * 60 } as const;

let limiter: RateLimiterMySQL | undefined;

/** Takes one look-up for this address; `retryAfter` (seconds) when the budget is spent. */
export async function takeVerifyLookup(address: string): Promise<{ ok: true } | { ok: false; retryAfter: number }> {
  limiter ??= new RateLimiterMySQL({ storeClient: db, storeType: 'knex', dbName: env().DB_NAME, tableName: 'sign_in_limits', tableCreated: true, ...VERIFY_LIMIT });
  try {
    await limiter.consume(address);
    return { ok: true };
  } catch (err) {
    if (err instanceof RateLimiterRes) return { ok: false, retryAfter: Math.max(1, Math.ceil(err.msBeforeNext / 1000)) };
    throw err;
  }
}
