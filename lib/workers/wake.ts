// After a request commits a job (an upload queues detection, a signing queues its PDF), this
// instance's worker process looks for it at once rather than at its next poll. The app server
// (server.mjs) passes the word on to its worker process; where none listens (a script, the seed,
// an instance run with its workers off), nothing happens and the job waits for a poll anywhere.
export type WorkerKind = 'candidates' | 'report-pdf';

/** The process event server.mjs listens to (the app's route code runs in the server's own process). */
export const WAKE_EVENT = 'fieldmark:wake-worker';

export function wakeWorker(kind: WorkerKind): void {
  (process.emit as (event: string, ...args: unknown[]) => boolean)(WAKE_EVENT, kind);
}
