// A whole Fieldmark of its own for the fault tests: MariaDB, the S3 fake and the mail sink on
// ports a fixed step above this run's own (+8; the service-script test uses +5), a data folder
// beside the run's own (`.data/faults` for the test profile), the demo seeded, and an app server
// (the run's own build) on its own port. The faults stop and start its services and its server,
// never the suite's. A stack left running by an interrupted run is stopped before a new one starts.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';

export type Service = 'db' | 's3' | 'mail';

const STEP = 8;
const near = (name: string, fallback: number) => String(Number(process.env[name] ?? fallback) + STEP);

export class ScratchStack {
  readonly dir = resolve(process.env.DATA_DIR ?? '.data/test', '..', 'faults');
  readonly port = near('PORT', 3100);
  readonly url = `http://localhost:${this.port}`;
  readonly env: NodeJS.ProcessEnv;
  private app?: ChildProcess;

  constructor() {
    const s3 = near('S3_PORT', 4579);
    const mailWeb = near('MAIL_WEB_PORT', 1090);
    this.env = {
      ...process.env,
      // Not "test": the worktree's .env sets the test profile's ports, which must not apply here.
      FIELDMARK_PROFILE: 'scratch',
      DATA_DIR: this.dir,
      DB_PORT: near('DB_PORT', 3417),
      S3_PORT: s3,
      S3_ENDPOINT: `http://127.0.0.1:${s3}`,
      SMTP_PORT: near('SMTP_PORT', 1035),
      MAIL_WEB_PORT: mailWeb,
      MAIL_WEB_URL: `http://127.0.0.1:${mailWeb}`,
      PORT: this.port,
      APP_URL: this.url,
      NEXTAUTH_URL: this.url,
      NEXT_DIST_DIR: process.env.NEXT_DIST_DIR ?? '.next-test',
      HOST: '127.0.0.1',
      // The seeded images would keep a core busy finding cells; these tests do not need them.
      CANDIDATE_WORKER: '0',
      REPORT_PDF_POLL_MS: '300',
      REPORT_PDF_RETRY_MS: '500',
      // Retried soon, and often enough to outlast a service stopped for a few seconds.
      REPORT_PDF_MAX_ATTEMPTS: '30',
    };
  }

  private run(args: string[], timeout = 180_000) {
    const r = spawnSync('bash', args, { env: this.env, encoding: 'utf8', timeout });
    if (r.status !== 0) throw new Error(`${args.join(' ')} failed (${r.status}): ${r.stdout}\n${r.stderr}`);
    return r.stdout;
  }

  services(cmd: 'start' | 'stop', service?: Service) {
    this.run(['scripts/services.sh', cmd, ...(service ? [service] : [])]);
  }

  private get appPidFile() {
    return join(this.dir, 'app.pid');
  }

  /** Services, schema and demo data, then the app — after stopping whatever an interrupted run left. */
  async up() {
    if (existsSync(this.dir)) {
      if (existsSync(this.appPidFile)) {
        try {
          process.kill(-Number(readFileSync(this.appPidFile, 'utf8')), 'SIGKILL');
        } catch {
          /* long gone */
        }
      }
      this.services('stop');
      rmSync(this.dir, { recursive: true, force: true });
    }
    mkdirSync(this.dir, { recursive: true });
    if (await this.answers()) throw new Error(`port ${this.port} is in use; the fault tests need it for their own app server`);
    this.services('start');
    this.run(['scripts/with-env.sh', 'npx', 'tsx', 'scripts/db.ts', 'migrate']);
    this.run(['scripts/with-env.sh', 'npx', 'tsx', 'scripts/db.ts', 'seed']);
    await this.startApp();
  }

  async startApp() {
    this.app = spawn('bash', ['scripts/with-env.sh', 'node', 'server.mjs'], { env: this.env, detached: true, stdio: 'ignore' });
    writeFileSync(this.appPidFile, String(this.app.pid));
    await this.waitForApp();
  }

  /** Stops the app server at once (SIGKILL to its process group: no graceful shutdown, as when an instance dies). */
  async killApp() {
    const app = this.app;
    if (!app?.pid) return;
    const exited = new Promise((r) => app.once('exit', r));
    try {
      process.kill(-app.pid, 'SIGKILL');
    } catch {
      /* already gone */
    }
    await exited;
    this.app = undefined;
  }

  private async answers(): Promise<boolean> {
    try {
      return (await fetch(`${this.url}/api/health`)).ok;
    } catch {
      return false;
    }
  }

  async waitForApp(timeoutMs = 60_000) {
    const until = Date.now() + timeoutMs;
    while (Date.now() < until) {
      if (this.app?.exitCode != null) throw new Error(`the scratch app on ${this.url} exited (${this.app.exitCode})`);
      if (await this.answers()) return;
      await new Promise((r) => setTimeout(r, 250));
    }
    throw new Error(`the scratch app on ${this.url} did not answer`);
  }

  /** Knex connection settings for the scratch database, as the schema's owner. */
  get dbConnection() {
    return { host: '127.0.0.1', port: Number(this.env.DB_PORT), user: this.env.DB_OWNER_USER ?? 'fieldmark_owner', password: this.env.DB_OWNER_PASSWORD ?? 'fieldmark-owner-local', database: this.env.DB_NAME ?? 'fieldmark' };
  }

  async down() {
    await this.killApp();
    try {
      this.services('stop');
    } finally {
      rmSync(this.dir, { recursive: true, force: true });
    }
  }
}
