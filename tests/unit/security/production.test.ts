import { describe, expect, it } from 'vitest';
import { BUILT_IN, isProductionStart, productionProblems, refusalMessage } from '@/lib/config/production';

const good = {
  NODE_ENV: 'production',
  APP_URL: 'https://fieldmark.lab.example',
  NEXTAUTH_SECRET: 'x'.repeat(48),
  DB_PASSWORD: 'a-real-db-password',
  S3_SECRET_ACCESS_KEY: 'a-real-s3-key',
};

describe('what counts as a production start', () => {
  it('is NODE_ENV=production on a public address, or FIELDMARK_PRODUCTION=1', () => {
    expect(isProductionStart(good)).toBe(true);
    expect(isProductionStart({ ...good, APP_URL: 'http://localhost:3000' })).toBe(false);
    expect(isProductionStart({ ...good, APP_URL: 'http://127.0.0.1:3100' })).toBe(false);
    expect(isProductionStart({ ...good, NODE_ENV: 'development' })).toBe(false);
    expect(isProductionStart({ APP_URL: 'http://localhost:3000', FIELDMARK_PRODUCTION: '1' })).toBe(true);
  });
});

describe('a production start is refused', () => {
  it('passes with its own secret and passwords', () => {
    expect(productionProblems(good)).toEqual([]);
  });

  it('without a secret, with the built-in one, or with a short one, naming NEXTAUTH_SECRET', () => {
    for (const secret of [undefined, BUILT_IN.NEXTAUTH_SECRET, 'short-secret-123']) {
      const problems = productionProblems({ ...good, NEXTAUTH_SECRET: secret });
      expect(problems, String(secret)).toHaveLength(1);
      expect(problems[0]).toMatch(/^NEXTAUTH_SECRET /);
    }
  });

  it('with the built-in database or S3 passwords, naming the variable', () => {
    expect(productionProblems({ ...good, DB_PASSWORD: BUILT_IN.DB_PASSWORD })[0]).toMatch(/^DB_PASSWORD /);
    expect(productionProblems({ ...good, DB_PASSWORD: undefined })[0]).toMatch(/^DB_PASSWORD /);
    expect(productionProblems({ ...good, S3_SECRET_ACCESS_KEY: BUILT_IN.S3_SECRET_ACCESS_KEY })[0]).toMatch(/^S3_SECRET_ACCESS_KEY /);
    // The owner's password matters to migrations, which the app never runs.
    expect(productionProblems(good, { migrations: true })[0]).toMatch(/^DB_OWNER_PASSWORD /);
    expect(productionProblems({ ...good, DB_OWNER_PASSWORD: 'owner-pass' }, { migrations: true })).toEqual([]);
  });

  it('says all of it at once', () => {
    const msg = refusalMessage(productionProblems({ NODE_ENV: 'production', APP_URL: 'https://x.example' }));
    for (const v of ['NEXTAUTH_SECRET', 'DB_PASSWORD', 'S3_SECRET_ACCESS_KEY']) expect(msg).toContain(v);
    expect(msg).toMatch(/^Fieldmark refuses to start in production/);
  });
});
