// Database tasks run by the start and test scripts, as the schema's owner: migrate (then the app
// account's table grants), rollback, seed, seed-if-empty (a restart never wipes data).
import knexFactory from 'knex';
import { grantAppAccount } from '../db/grants';
import { knexConfig } from '../knexfile';
import { isProductionStart, productionProblems, refusalMessage } from '../lib/config/production';
import { env } from '../lib/env';

const task = process.argv[2];
const production = isProductionStart(process.env);
if (production) {
  const problems = productionProblems(process.env, { migrations: true });
  if (problems.length) {
    console.error(refusalMessage(problems));
    process.exit(1);
  }
}
const db = knexFactory(knexConfig(undefined, 'owner'));

async function grant() {
  const e = env();
  if (e.DB_USER === e.DB_OWNER_USER) {
    console.warn('[fieldmark] DB_USER is the schema owner: the app can alter tables and the audit log. Give the app an account of its own (README, Configuration).');
    return;
  }
  const hosts = e.DB_APP_HOSTS.split(',').map((h) => h.trim()).filter(Boolean);
  const n = await grantAppAccount(db, { database: e.DB_NAME, user: e.DB_USER, hosts });
  console.log(`[fieldmark] app account ${e.DB_USER}: row access to ${n} table(s), audit log append-only`);
}

async function main() {
  switch (task) {
    case 'migrate': {
      const [batch, done] = await db.migrate.latest();
      console.log(done.length ? `[fieldmark] migrated (batch ${batch}): ${done.length} migration(s)` : '[fieldmark] database schema up to date');
      await grant();
      break;
    }
    case 'grant':
      await grant();
      break;
    case 'rollback': {
      const [, done] = await db.migrate.rollback(undefined, process.argv.includes('--all'));
      console.log(`[fieldmark] rolled back ${done.length} migration(s)`);
      break;
    }
    case 'seed': {
      const [files] = await db.seed.run();
      console.log(`[fieldmark] seeded: ${files.length} seed file(s)`);
      break;
    }
    case 'seed-if-empty': {
      // The demo scenario's accounts share one published password: never in a production database.
      if (production) {
        console.log('[fieldmark] production start: demo seed skipped');
        break;
      }
      const row = await db('users').count<{ n: number }[]>({ n: '*' }).first();
      if (Number(row?.n ?? 0) > 0) {
        console.log('[fieldmark] database already has data: demo seed skipped');
      } else {
        const [files] = await db.seed.run();
        console.log(`[fieldmark] demo scenario seeded (${files.length} seed file(s))`);
      }
      break;
    }
    default:
      throw new Error('usage: tsx scripts/db.ts migrate|grant|rollback [--all]|seed|seed-if-empty');
  }
}

main()
  .then(() => db.destroy())
  .catch(async (err) => {
    console.error(`[fieldmark] database task "${task}" failed: ${err instanceof Error ? err.message : err}`);
    await db.destroy();
    process.exit(1);
  });
