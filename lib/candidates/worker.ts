// The detection worker: takes due jobs from the queue (jobs.ts), reads the image's
// original from object storage, finds its candidates and stores them. Every app instance's
// worker process runs one (lib/workers/process.ts); any number may run at once, since a job is
// taken by one at a time. Its database and storage come as arguments, so tests can run several.
import type { Knex } from 'knex';
import { mergeLabSettings } from '@/lib/settings/lab-settings';
import { detectCandidates, type DetectOptions, type DetectResult } from './detect';
import { errorText, startJobLoop, type RunningJobLoop } from '@/lib/jobs/queue';
import { completeJob, detectionQueue, JOB_DEFAULTS, type JobOptions } from './jobs';

export interface WorkerDeps {
  db: Knex;
  /** The stored original's bytes. */
  readObject: (key: string) => Promise<Buffer>;
  /** Shown on the job while it runs (which instance has it). */
  name: string;
  options?: Partial<JobOptions>;
  /** Replaceable in tests; the real detector otherwise. */
  detect?: (input: Buffer, options: DetectOptions) => Promise<DetectResult>;
  log?: (message: string) => void;
}

export type Outcome = { imageId: number; outcome: 'done' | 'retry' | 'failed' | 'lost' };

/** Takes and runs one due job; null when none is due. */
export async function processNextJob(deps: WorkerDeps): Promise<Outcome | null> {
  const opts = { ...JOB_DEFAULTS, ...deps.options };
  const job = await detectionQueue.claim(deps.db, deps.name, opts);
  if (!job) return null;
  const fail = async (reason: string, final = false): Promise<Outcome> => {
    const outcome = await detectionQueue.fail(deps.db, job, reason, opts, final);
    deps.log?.(`image ${job.id}: ${reason} (${outcome})`);
    return { imageId: job.id, outcome };
  };

  const image = await deps.db('field_images').where({ id: job.id }).first('original_key', 'microns_per_pixel');
  if (!image) return fail('The field image no longer exists.', true);
  let scale = Number(image.microns_per_pixel);
  let scaleSource: 'image' | 'lab setting' = 'image';
  if (!(scale > 0)) {
    const row = await deps.db('lab_settings').where({ key: 'lab' }).first('value');
    scale = mergeLabSettings(row ? (typeof row.value === 'string' ? JSON.parse(row.value) : row.value) : null).unscaledMicronsPerPixel;
    scaleSource = 'lab setting';
  }

  let bytes: Buffer;
  try {
    bytes = await deps.readObject(image.original_key);
  } catch (err) {
    return fail(`The original image could not be read from the image store (${errorText(err)}).`);
  }
  let result: DetectResult;
  try {
    result = await (deps.detect ?? detectCandidates)(bytes, { micronsPerPixel: scale, scaleSource });
  } catch (err) {
    return fail(`The image could not be analysed: ${errorText(err)}.`);
  }
  const stored = await completeJob(deps.db, job, result);
  return { imageId: job.id, outcome: stored ? 'done' : 'lost' };
}

export type RunningWorker = RunningJobLoop;

/** Runs jobs one after another while there are any, and looks again every `pollMs` (or when woken) when there are none. */
export function startWorker(deps: WorkerDeps & { pollMs: number }): RunningWorker {
  return startJobLoop(async () => (await processNextJob(deps)) !== null, deps.pollMs, deps.log);
}
