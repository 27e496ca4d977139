// Database tasks run by the start and test scripts: migrate, rollback, seed,
// seed-if-empty (a restart never wipes data), and wait (for a database that is starting).
import knexFactory from 'knex';
import { knexConfig } from '../knexfile';

const task = process.argv[2];
const db = knexFactory(knexConfig());

async function main() {
  switch (task) {
    case 'migrate': {
      const [batch, done] = await db.migrate.latest();
      console.log(done.length ? `[fieldmark] migrated (batch ${batch}): ${done.length} migration(s)` : '[fieldmark] database schema up to date');
      break;
    }
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
      throw new Error('usage: tsx scripts/db.ts migrate|rollback [--all]|seed|seed-if-empty');
  }
}

main()
  .then(() => db.destroy())
  .catch(async (err) => {
    console.error(`[fieldmark] database task "${task}" failed: ${err instanceof Error ? err.message : err}`);
    await db.destroy();
    process.exit(1);
  });
