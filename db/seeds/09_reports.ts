import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Knex } from 'knex';
import { collectionReport, signReportTx, amendReportTx } from '../queries/report-core';
import { DEMO_CENTRE_NAME, DEMO_FEVER, DEMO_RECORDERS, DEMO_STALLIONS } from '../../lib/demo/scenario';
import { UPLOAD_LIMITS } from '../../lib/images/limits';
import { storeFieldImage } from '../../lib/images/store';
import { FIRST_READ, SECOND_READ, SETTLED_READ, SUBMITTED } from '../../lib/reads/kinds';
import { processNextPdfJob } from '../../lib/reports/pdf-jobs';
import { renderReportPdf } from '../../lib/reports/pdf/render';
import { mergeLabSettings } from '../../lib/settings/lab-settings';
import { mulberry32, type Random } from '../../lib/synthetic/prng';
import { generateField } from '../../lib/synthetic/generate-field';
import { env } from '../../lib/env';
import * as storage from '../../storage/s3-core';

/*
 * Signed reports for the demo, so the owner's portal, the verification page and the
 * veterinarian's work lists have something to show after `npm start`:
 * - Thistlewick Lantern (the demo owner's stallion), 20 April (his nearest collection, 21 April): second read and settled read,
 *   signed; 10 June (inside the fever's window): signed, amended once with a reason and signed
 *   again, so version 1 is superseded by version 2; 28 July: a second read agreeing cell for cell,
 *   left unsigned for the veterinarian's "ready to sign" list.
 * - Marrowby Sextant (another owner's stallion), 20 May (his nearest, 21 May): field images, first, second and settled
 *   reads, signed.
 * Reads are added only where missing (an earlier seed may have made second or settled reads), and
 * a collection that already has a signed version is left alone: re-runnable. Reports are signed
 * through the app's own signing code, and their PDFs rendered and stored through the app's own
 * render queue.
 */

// `tags` comes back from MariaDB's JSON column as text or, parsed, as an array.
type Mark = { id: string; read_id: number; image_id: number; x: number; y: number; class_key: string; tags: string | string[] };

async function user(knex: Knex, email: string): Promise<{ id: number; name: string }> {
  const u = await knex('users').where({ email }).first('id', 'name');
  if (!u) throw new Error(`Seed 09 needs the demo user ${email} (seed 01).`);
  return u;
}

async function nearestCollection(knex: Knex, registration: string, date: string) {
  return knex('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .where('s.registration', registration)
    .orderByRaw('abs(timestampdiff(second, k.collected_at, ?))', [`${date} 09:00:00`])
    .first('k.id', 'k.collected_at', 'k.magnification', 'k.optics');
}

const pick = <T,>(rnd: Random, xs: readonly T[]) => xs[Math.floor(rnd() * xs.length)]!;
const DEFECTS = ['abnormal_head', 'proximal_droplet', 'distal_droplet', 'bent_coiled_tail', 'abnormal_midpiece', 'detached_head'];

async function readRow(knex: Knex, collectionId: number, kind: string, readerId: number, at: Date) {
  const set = await knex('class_sets').where({ is_default: true }).first();
  const classes = typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes;
  const [id] = await knex('reads').insert({
    collection_id: collectionId, kind, reader_id: readerId, class_set_id: set.id, class_set_snapshot: JSON.stringify({ name: set.name, classes }),
    target_cells: 200, status: SUBMITTED, started_at: at, submitted_at: new Date(at.getTime() + 3600e3),
  });
  return id as number;
}

const copy = (m: Mark, readId: number, over: Partial<Mark> = {}): Mark => ({ ...m, id: crypto.randomUUID(), read_id: readId, ...over });

async function insertMarks(knex: Knex, marks: Mark[], userId: number) {
  for (let i = 0; i < marks.length; i += 200) {
    await knex('marks').insert(marks.slice(i, i + 200).map((m) => ({ ...m, tags: typeof m.tags === 'string' ? m.tags : JSON.stringify(m.tags), version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: userId })));
  }
}

/**
 * A blind second read of the first read's cells: each mark moved by up to 2 px, `changes` cells
 * given another class, one cell missed and one extra cell marked. With `settle`, the settled read
 * too: the first read's cells with the second reader's class on all but one disagreement, the
 * missed cell kept, the extra one added.
 */
async function addSecondRead(knex: Knex, collectionId: number, seed: number, reader: { id: number }, opts: { changes: number; missAndExtra: boolean; settle: boolean }) {
  const reads = await knex('reads').where({ collection_id: collectionId }).select('id', 'kind', 'status');
  const first = reads.find((r) => r.kind === FIRST_READ && r.status === SUBMITTED);
  if (!first || reads.some((r) => r.kind === SECOND_READ)) return;
  const rnd = mulberry32(seed);
  const firstMarks: Mark[] = await knex('marks').where({ read_id: first.id, deleted: false }).orderBy('id').select('id', 'read_id', 'image_id', 'x', 'y', 'class_key', 'tags');
  const c = await knex('collections').where({ id: collectionId }).first('collected_at');
  const at = new Date(new Date(c.collected_at).getTime() + 26 * 3600e3);
  const secondId = await readRow(knex, collectionId, SECOND_READ, reader.id, at);
  const jitter = (v: number) => Math.max(0, Math.round((Number(v) + (rnd() * 4 - 2)) * 100) / 100);
  const changed = new Map<string, string>();
  while (changed.size < opts.changes) {
    const m = pick(rnd, firstMarks);
    if (!changed.has(m.id)) changed.set(m.id, m.class_key === 'normal' ? pick(rnd, DEFECTS) : 'normal');
  }
  const missed = opts.missAndExtra ? (firstMarks.find((m) => !changed.has(m.id) && rnd() < 0.2) ?? firstMarks[0]!) : null;
  const extra: Mark = { ...firstMarks[0]!, x: 12, y: 12, class_key: 'normal' };
  const second = [
    ...firstMarks.filter((m) => m !== missed).map((m) => copy(m, secondId, { x: jitter(m.x), y: jitter(m.y), class_key: changed.get(m.id) ?? m.class_key })),
    ...(opts.missAndExtra ? [copy(extra, secondId)] : []),
  ];
  await insertMarks(knex, second, reader.id);
  if (!opts.settle || reads.some((r) => r.kind === SETTLED_READ)) return;
  const settledId = await readRow(knex, collectionId, SETTLED_READ, reader.id, new Date(at.getTime() + 2 * 3600e3));
  const keepFirst = [...changed.keys()][0];
  await insertMarks(
    knex,
    [...firstMarks.map((m) => copy(m, settledId, { class_key: m.id === keepFirst ? m.class_key : (changed.get(m.id) ?? m.class_key) })), ...(opts.missAndExtra ? [copy(extra, settledId)] : [])],
    reader.id,
  );
}

/** Field images and a first read for a collection that has none (the drawn cells are the read). */
async function addImagesAndFirstRead(knex: Knex, collectionId: number, tech: { id: number }, seed: number) {
  if (await knex('field_images').where({ collection_id: collectionId }).first('id')) return;
  const c = await knex('collections').where({ id: collectionId }).first('collected_at', 'magnification', 'optics');
  const dir = await mkdtemp(join(tmpdir(), 'fieldmark-seed-'));
  const cells: { imageId: number; x: number; y: number; classKey: string }[] = [];
  try {
    for (let i = 0; i < 3; i++) {
      const field = await generateField({ seed: seed + i, width: 2000, height: 1500, micronsPerPixel: 0.3, cells: { total: 70, weights: { normal: 0.74, proximal_droplet: 0.07, distal_droplet: 0.06, bent_coiled_tail: 0.07, abnormal_head: 0.06 } }, format: 'jpeg' });
      const file = join(dir, `field-${collectionId}-${i + 1}.jpg`);
      await writeFile(file, field.image);
      const stored = await storeFieldImage(knex, storage, { collectionId, filePath: file, fileName: `field-${String(i + 1).padStart(2, '0')}.jpg`, uploadedBy: tech.id, micronsPerPixel: 0.3, magnification: c.magnification, optics: c.optics }, UPLOAD_LIMITS);
      if (!stored.ok) throw new Error(`seed image refused: ${stored.message}`);
      for (const cell of field.cells) cells.push({ imageId: stored.id, x: cell.x, y: cell.y, classKey: cell.classKey });
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
  await knex.transaction(async (trx) => {
    const readId = await readRow(trx, collectionId, FIRST_READ, tech.id, new Date(new Date(c.collected_at).getTime() + 3 * 3600e3));
    await insertMarks(trx, cells.map((m) => ({ id: crypto.randomUUID(), read_id: readId, image_id: m.imageId, x: Math.round(m.x * 100) / 100, y: Math.round(m.y * 100) / 100, class_key: m.classKey, tags: '[]' })), tech.id);
  });
}

const days = (d: Date | string, n: number, hour = 15) => {
  const t = new Date(d);
  t.setUTCDate(t.getUTCDate() + n);
  t.setUTCHours(hour, 0, 0, 0);
  return t;
};

async function sign(knex: Knex, collectionId: number, vet: { id: number; name: string }, at: Date, text: { remarks: string | null; interpretation: string | null }) {
  const state = await collectionReport(knex, collectionId);
  if (!state.readiness.ready) {
    console.warn(`[fieldmark] seed 09: collection ${collectionId} not signed: ${state.readiness.reasons.map((r) => r.message).join(' ')}`);
    return null;
  }
  return knex.transaction((trx) => signReportTx(trx, { collectionId, signer: vet, at, text }));
}

export async function seed(knex: Knex): Promise<void> {
  const [tech, reader, vet] = await Promise.all([user(knex, DEMO_RECORDERS.collections), user(knex, 'reader@quillfield.example'), user(knex, 'vet@quillfield.example')]);

  // The demo centre's name and address on its reports (kept when a lab manager has set them).
  const row = await knex('lab_settings').where({ key: 'lab' }).first('value');
  const settings = mergeLabSettings(row ? (typeof row.value === 'string' ? JSON.parse(row.value) : row.value) : null);
  if (!settings.labName) {
    await knex('lab_settings')
      .insert({ key: 'lab', value: JSON.stringify({ ...settings, labName: DEMO_CENTRE_NAME, labAddress: 'Mill Lane, Quillfield' }) })
      .onConflict('key')
      .merge();
  }

  const fever = DEMO_FEVER.stallionRegistration;
  const april = await nearestCollection(knex, fever, '2026-04-20');
  const june = await nearestCollection(knex, fever, '2026-06-10');
  const july = await nearestCollection(knex, fever, '2026-07-28');
  const sextant = DEMO_STALLIONS.find((s) => s.key === 'marrowby-sextant')!;
  const may = await nearestCollection(knex, sextant.registration, '2026-05-20');
  if (!april || !june || !july || !may) throw new Error('Seed 09 needs the demo collections (seed 03) and their reads (seed 06).');

  // Each collection's reads in one transaction: a failed seed leaves no half-made read behind.
  const second = (id: number, seed: number, opts: Parameters<typeof addSecondRead>[4]) => knex.transaction((trx) => addSecondRead(trx, id, seed, reader, opts));
  await second(april.id, 9001, { changes: 3, missAndExtra: true, settle: true });
  await second(june.id, 9002, { changes: 4, missAndExtra: true, settle: true });
  await second(july.id, 9003, { changes: 0, missAndExtra: false, settle: false });
  await addImagesAndFirstRead(knex, may.id, tech, 9100);
  await second(may.id, 9004, { changes: 2, missAndExtra: true, settle: true });

  const signedAlready = async (id: number) => Boolean(await knex('report_versions').where({ collection_id: id }).first('id'));

  if (!(await signedAlready(april.id))) {
    await sign(knex, april.id, vet, days(april.collected_at, 2), {
      remarks: 'Morphology within this stallion’s usual range for the spring.',
      interpretation: 'No finding that argues against breeding with this stallion on these figures.',
    });
  }
  if (!(await signedAlready(may.id))) {
    await sign(knex, may.id, vet, days(may.collected_at, 2), {
      remarks: 'Routine evaluation during the season.',
      interpretation: 'Figures consistent with a fertile stallion; no action needed.',
    });
  }
  if (!(await signedAlready(june.id))) {
    const v1 = await sign(knex, june.id, vet, days(june.collected_at, 2), {
      remarks: 'More proximal droplets and bent tails than in the spring.',
      interpretation: null,
    });
    if (v1) {
      const amendedAt = days(june.collected_at, 5, 10);
      await knex.transaction((trx) => amendReportTx(trx, { reportId: v1.reportId, by: vet, reason: 'Interpretation added after the follow-up examination.', at: amendedAt }));
      await sign(knex, june.id, vet, days(june.collected_at, 5, 11), {
        remarks: 'More proximal droplets and bent tails than in the spring.',
        interpretation: `Within the spermatogenic window of the fever of ${DEMO_FEVER.date}: these figures are not representative of the stallion’s usual quality. Re-evaluate after the window clears.`,
      });
    }
  }

  // The PDFs, through the app's render queue (the first render in a process takes a few seconds).
  const appUrl = env().APP_URL;
  let rendered = 0;
  while (await processNextPdfJob({ db: knex, put: storage.put, render: (s) => renderReportPdf(s, { appUrl }), name: 'demo seed', log: (m) => console.warn(`[fieldmark] seed 09: ${m}`) })) rendered++;
  if (rendered) console.log(`[fieldmark] seed 09: ${rendered} signed report PDF(s) rendered and stored`);
}
