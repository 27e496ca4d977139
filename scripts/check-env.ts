// Run by scripts/start.sh before anything starts: a production start with a missing or built-in
// secret or password stops here, naming the variable to set. The app checks again when it boots
// (instrumentation.ts), so a start that skips this script is refused too.
import { isProductionStart, productionProblems, refusalMessage } from '../lib/config/production';

const scope = { app: !process.argv.includes('--migrations-only'), migrations: !process.argv.includes('--app-only') };
if (isProductionStart(process.env)) {
  const problems = productionProblems(process.env, scope);
  if (problems.length) {
    console.error(refusalMessage(problems));
    process.exit(1);
  }
}
