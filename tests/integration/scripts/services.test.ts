import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { createServer, type Server } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

// The service scripts on a scratch profile of their own (own ports and data folder).
const dir = mkdtempSync(join(tmpdir(), 'fm-svc-'));
// Ports a fixed step above this run's own, so test runs side by side (other checkouts) do not collide.
const near = (name: string, fallback: number) => String(Number(process.env[name] ?? fallback) + 5);
const DB_PORT = near('DB_PORT', 3417);
const env = {
  ...process.env,
  FIELDMARK_PROFILE: 'scratch',
  DATA_DIR: dir,
  DB_PORT,
  S3_PORT: near('S3_PORT', 4579),
  SMTP_PORT: near('SMTP_PORT', 1035),
  MAIL_WEB_PORT: near('MAIL_WEB_PORT', 1090),
  PORT: near('PORT', 3100),
  S3_ENDPOINT: `http://127.0.0.1:${near('S3_PORT', 4579)}`,
  MAIL_WEB_URL: `http://127.0.0.1:${near('MAIL_WEB_PORT', 1090)}`,
};
const services = (cmd: string) => spawnSync('bash', ['scripts/services.sh', cmd], { env, encoding: 'utf8', timeout: 120_000 });
const sql = (q: string) => execFileSync('mariadb', ['--no-defaults', `--socket=${dir}/run/mariadb.sock`, '-uroot', '-N', '-e', q], { encoding: 'utf8' }).trim();

function occupy(port: number): Promise<Server> {
  return new Promise((resolve) => {
    const s = createServer();
    s.listen(port, '127.0.0.1', () => resolve(s));
  });
}

afterAll(() => {
  services('stop');
  rmSync(dir, { recursive: true, force: true });
});

describe('service scripts', { timeout: 120_000 }, () => {
  it('start idempotently, and keep data across a stop and a start', () => {
    const first = services('start');
    expect(first.status, first.stderr).toBe(0);
    const again = services('start');
    expect(again.stdout).toMatch(/MariaDB already up/);
    expect(again.stdout).toMatch(/s3-fake already up/);
    sql('CREATE DATABASE IF NOT EXISTS keepcheck; CREATE TABLE keepcheck.t (v varchar(20)); INSERT INTO keepcheck.t VALUES ("still here")');
    expect(services('stop').status).toBe(0);
    expect(services('status').stdout).toMatch(/MariaDB .*: down/);
    expect(services('start').status).toBe(0);
    expect(sql('SELECT v FROM keepcheck.t')).toBe('still here');
  });

  it('give the app account no database-wide privilege, taking back what older checkouts granted', () => {
    expect(services('start').status).toBe(0);
    const app = (host: string) => `'${process.env.DB_USER ?? 'fieldmark'}'@'${host}'`;
    // What a data folder made before the owner account existed holds.
    sql(`GRANT ALL PRIVILEGES ON fieldmark.* TO ${app('127.0.0.1')}; GRANT ALL PRIVILEGES ON \`fieldmark_%\`.* TO ${app('127.0.0.1')}; GRANT ALL PRIVILEGES ON fieldmark.* TO ${app('localhost')}`);
    expect(sql(`SHOW GRANTS FOR ${app('127.0.0.1')}`)).toMatch(/GRANT ALL PRIVILEGES ON `fieldmark`/);
    // A second start (services already up) brings the accounts up to date too.
    expect(services('start').status).toBe(0);
    for (const host of ['127.0.0.1', 'localhost']) {
      const grants = sql(`SHOW GRANTS FOR ${app(host)}`);
      expect(grants, host).not.toMatch(/ALL PRIVILEGES/);
      expect(grants, host).not.toMatch(/ON `fieldmark/);
    }
    const owner = sql(`SHOW GRANTS FOR '${process.env.DB_OWNER_USER ?? 'fieldmark_owner'}'@'127.0.0.1'`);
    expect(owner).toMatch(/GRANT ALL PRIVILEGES ON `fieldmark`\.\* TO .* WITH GRANT OPTION/);
  });

  it('make the session secret once per profile, private to its owner, and reuse it', () => {
    const secret = () => execFileSync('bash', ['-c', '. scripts/env.sh; printf %s "$NEXTAUTH_SECRET"'], { env: { ...env, NEXTAUTH_SECRET: '' }, encoding: 'utf8' });
    const first = secret();
    expect(Buffer.from(first, 'base64url').length).toBeGreaterThanOrEqual(32);
    expect(statSync(join(dir, 'nextauth-secret')).mode & 0o777).toBe(0o600);
    expect(secret()).toBe(first);
    expect(first).not.toBe(process.env.NEXTAUTH_SECRET);
    // A production address gets none made: it must bring its own.
    const prod = execFileSync('bash', ['-c', '. scripts/env.sh; printf %s "${NEXTAUTH_SECRET:-none}"'], { env: { ...env, NEXTAUTH_SECRET: '', APP_URL: 'https://fieldmark.lab.example' }, encoding: 'utf8' });
    expect(prod).toBe('none');
  });

  it('refuse a production start with a built-in secret or password, naming the variable', () => {
    const r = spawnSync('bash', ['scripts/start.sh'], { env: { ...env, FIELDMARK_PRODUCTION: '1', NEXTAUTH_SECRET: 'local-development-secret-change-me-in-production' }, encoding: 'utf8', timeout: 120_000 });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/refuses to start in production/);
    for (const v of ['NEXTAUTH_SECRET', 'DB_PASSWORD', 'DB_OWNER_PASSWORD', 'S3_SECRET_ACCESS_KEY']) expect(r.stderr).toContain(v);
  });

  it('the app itself refuses such a start too, whoever starts it', () => {
    const distDir = process.env.NEXT_DIST_DIR ?? '.next-test';
    expect(existsSync(join(distDir, 'BUILD_ID')), `the app's build in ${distDir} (npm test makes it)`).toBe(true);
    const r = spawnSync('node', ['server.mjs'], { env: { ...env, NEXT_DIST_DIR: distDir, FIELDMARK_PRODUCTION: '1', HOST: '127.0.0.1', NEXTAUTH_SECRET: '' }, encoding: 'utf8', timeout: 60_000 });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/NEXTAUTH_SECRET is not set/);
  });

  it('say clearly when a port is taken', async () => {
    services('stop');
    const blocker = await occupy(Number(DB_PORT));
    try {
      const r = services('start');
      expect(r.status).toBe(1);
      expect(r.stderr).toMatch(new RegExp(`port ${DB_PORT} is taken by another program; set DB_PORT`));
    } finally {
      blocker.close();
    }
    const app = await occupy(Number(env.PORT));
    try {
      const r = spawnSync('bash', ['scripts/start.sh'], { env, encoding: 'utf8', timeout: 120_000 });
      expect(r.status).toBe(1);
      expect(r.stderr).toMatch(new RegExp(`port ${env.PORT} is already in use`));
    } finally {
      app.close();
    }
  });
});
