import 'server-only';
import { createHash } from 'node:crypto';
import { RateLimiterMySQL, RateLimiterRes } from 'rate-limiter-flexible';
import { db } from '@/db/knex';
import { env } from '@/lib/env';

/**
 * Sign-in limits, counted in MariaDB so they hold across app instances. The common pattern for
 * sign-in endpoints: a tight limit per account and address, so guessing from one place stops
 * quickly without locking the owner out when they sign in from another; a slower limit per
 * account, for guessing spread over many addresses; and one per address across accounts.
 * Every attempt takes its point before the password is checked (the limiter's own atomic
 * consume), so parallel attempts cannot all slip through between a check and a count.
 */
export const SIGN_IN_LIMITS = {
  accountAddress: { keyPrefix: 'acctaddr', points: 5, duration: 15 * 60 },
  account: { keyPrefix: 'acct', points: 50, duration: 24 * 60 * 60 },
  address: { keyPrefix: 'addr', points: 100, duration: 24 * 60 * 60 },
} as const;

type Name = keyof typeof SIGN_IN_LIMITS;
const NAMES = Object.keys(SIGN_IN_LIMITS) as Name[];

/** The keys as stored (without the prefix); the pair is hashed, since an e-mail alone may fill the key column. */
export function signInLimitKeys(email: string, address: string): Record<Name, string> {
  const account = email.toLowerCase();
  return { accountAddress: createHash('sha256').update(`${account}|${address}`).digest('hex'), account, address };
}

let limiters: Record<Name, RateLimiterMySQL> | undefined;

function get(): Record<Name, RateLimiterMySQL> {
  if (!limiters) {
    const common = { storeClient: db, storeType: 'knex', dbName: env().DB_NAME, tableName: 'sign_in_limits', tableCreated: true };
    limiters = Object.fromEntries(NAMES.map((n) => [n, new RateLimiterMySQL({ ...common, ...SIGN_IN_LIMITS[n] })])) as Record<Name, RateLimiterMySQL>;
  }
  return limiters;
}

/** Takes one point from every limit for this attempt; `retryAfter` (seconds) when any is spent. */
export async function takeSignInAttempt(email: string, address: string): Promise<{ ok: true } | { ok: false; retryAfter: number }> {
  const keys = signInLimitKeys(email, address);
  const results = await Promise.allSettled(NAMES.map((n) => get()[n].consume(keys[n])));
  let waitMs = 0;
  for (const r of results) {
    if (r.status === 'fulfilled') continue;
    // The limiter rejects with its result when a budget is spent, and with an Error when the store failed.
    if (!(r.reason instanceof RateLimiterRes)) throw r.reason;
    waitMs = Math.max(waitMs, r.reason.msBeforeNext);
  }
  return waitMs > 0 || results.some((r) => r.status === 'rejected') ? { ok: false, retryAfter: Math.max(1, Math.ceil(waitMs / 1000)) } : { ok: true };
}

/**
 * A successful sign-in gives back the point it took, and clears the account-and-address count
 * (the failures before it were the owner's own typing).
 */
export async function signInSucceeded(email: string, address: string): Promise<void> {
  const keys = signInLimitKeys(email, address);
  const l = get();
  await Promise.all([l.accountAddress.delete(keys.accountAddress), l.account.reward(keys.account, 1), l.address.reward(keys.address, 1)]);
}
