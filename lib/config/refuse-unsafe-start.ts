import { isProductionStart, productionProblems, refusalMessage } from './production';

/** Stops the process when a production start lacks its own secret or passwords (README, Configuration). */
export function refuseUnsafeProductionStart(): void {
  if (!isProductionStart(process.env)) return;
  const problems = productionProblems(process.env);
  if (problems.length) {
    console.error(refusalMessage(problems));
    process.exit(1);
  }
}
