import 'server-only';
import { RateLimiterMySQL, RateLimiterRes } from 'rate-limiter-flexible';
import { db } from '@/db/knex';
import { env } from '@/lib/env';

// Failed sign-ins are counted in MariaDB so the limit holds across app instances.
export const ACCOUNT_LIMIT = { points: 5, duration: 15 * 60 };
export const ADDRESS_LIMIT = { points: 30, duration: 15 * 60 };

let limiters: { account: RateLimiterMySQL; address: RateLimiterMySQL } | undefined;

function get() {
  if (!limiters) {
    const common = { storeClient: db, storeType: 'knex', dbName: env().DB_NAME, tableName: 'sign_in_limits', tableCreated: true };
    limiters = {
      account: new RateLimiterMySQL({ ...common, keyPrefix: 'acct', ...ACCOUNT_LIMIT }),
      address: new RateLimiterMySQL({ ...common, keyPrefix: 'addr', ...ADDRESS_LIMIT }),
    };
  }
  return limiters;
}

/** Seconds until the caller may try again, or 0 when not blocked. */
export async function signInBlockedFor(email: string, address: string): Promise<number> {
  const { account, address: addr } = get();
  const [a, b] = await Promise.all([account.get(email.toLowerCase()), addr.get(address)]);
  const wait = (r: RateLimiterRes | null, max: number) =>
    r && r.consumedPoints >= max ? Math.ceil(r.msBeforeNext / 1000) : 0;
  return Math.max(wait(a, ACCOUNT_LIMIT.points), wait(b, ADDRESS_LIMIT.points));
}

export async function recordFailedSignIn(email: string, address: string): Promise<void> {
  const { account, address: addr } = get();
  // consume() rejects once the budget is spent; that is the state we record, not an error.
  await Promise.allSettled([account.consume(email.toLowerCase()), addr.consume(address)]);
}

export async function clearSignInFailures(email: string): Promise<void> {
  await get().account.delete(email.toLowerCase());
}
