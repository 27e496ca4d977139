import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Knex } from 'knex';
import { DEMO_RECORDERS, DEMO_STALLIONS } from '../../lib/demo/scenario';
import { UPLOAD_LIMITS } from '../../lib/images/limits';
import { storeFieldImage } from '../../lib/images/store';
import { FIRST_READ, OPEN, SECOND_READ, SUBMITTED, type ReadKind, type ReadStatus } from '../../lib/reads/kinds';
import { mulberry32, type Random } from '../../lib/synthetic/prng';
import { generateField } from '../../lib/synthetic/generate-field';
import * as storage from '../../storage/s3-core';

/*
 * Blind second reads by the second technician (reader@quillfield.example), so the second
 * reader's work lists, the agreement figures and "recount advised" have something to show:
 * - Copperline Drifter, about 20 June: first read, and a second read with four cells given another
 *   class, one cell missed and one extra cell marked (well within the acceptable difference);
 * - Saffron Tideglass, about 16 June: a second read that calls 24 of the first read's normal cells
 *   abnormal, beyond the acceptable difference for duplicate counts: "recount advised";
 * - Ambervale Corsair, about 12 May: a first read submitted, waiting for a second read;
 * - Copperline Drifter, about 10 July: a second read in progress (open, blind), half marked.
 * Each collection gets two synthetic field images (100 drawn cells each) whose cells are the first
 * read. Runs before seeds 08 and 09 and leaves their collections alone. Re-runnable: a collection
 * that already has field images is skipped.
 */

type Plan = { stallionKey: string; date: string; seed: number; second: null | { reclass: number; toAbnormal?: boolean; missAndExtra: boolean; status: ReadStatus; share?: number } };

const PLAN: Plan[] = [
  { stallionKey: 'copperline-drifter', date: '2026-06-20', seed: 7100, second: { reclass: 4, missAndExtra: true, status: SUBMITTED } },
  { stallionKey: 'saffron-tideglass', date: '2026-06-16', seed: 7200, second: { reclass: 24, toAbnormal: true, missAndExtra: true, status: SUBMITTED } },
  { stallionKey: 'ambervale-corsair', date: '2026-05-12', seed: 7300, second: null },
  { stallionKey: 'copperline-drifter', date: '2026-07-10', seed: 7400, second: { reclass: 2, missAndExtra: false, status: OPEN, share: 0.5 } },
];

const FIELD = { width: 2000, height: 1500, micronsPerPixel: 0.3, images: 2, cellsPerImage: 100 };
const WEIGHTS = { normal: 0.72, proximal_droplet: 0.07, distal_droplet: 0.06, bent_coiled_tail: 0.07, abnormal_head: 0.05, abnormal_midpiece: 0.03 };
const DEFECTS = ['abnormal_head', 'proximal_droplet', 'distal_droplet', 'bent_coiled_tail', 'abnormal_midpiece'];

type Cell = { imageId: number; x: number; y: number; classKey: string };

const round2 = (v: number) => Math.round(v * 100) / 100;
const pick = <T,>(rnd: Random, xs: readonly T[]) => xs[Math.floor(rnd() * xs.length)]!;

async function collectionNear(knex: Knex, registration: string, date: string) {
  return knex('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .where('s.registration', registration)
    .orderByRaw('abs(timestampdiff(second, k.collected_at, ?))', [`${date} 09:00:00`])
    .first('k.id', 'k.collected_at', 'k.magnification', 'k.optics', 'k.signed_report_id');
}

async function insertRead(trx: Knex.Transaction, set: { id: number; snapshot: string }, collectionId: number, kind: ReadKind, readerId: number, status: ReadStatus, at: Date, cells: Cell[]) {
  const [id] = await trx('reads').insert({
    collection_id: collectionId, kind, reader_id: readerId, class_set_id: set.id, class_set_snapshot: set.snapshot, target_cells: 200, status,
    started_at: at, submitted_at: status === SUBMITTED ? new Date(at.getTime() + 90 * 60e3) : null,
  });
  for (let i = 0; i < cells.length; i += 200) {
    await trx('marks').insert(
      cells.slice(i, i + 200).map((c) => ({
        id: crypto.randomUUID(), read_id: id, image_id: c.imageId, x: round2(c.x), y: round2(c.y), class_key: c.classKey, tags: '[]',
        version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: readerId,
      })),
    );
  }
  return id as number;
}

/** The second reader's cells: the first read's, moved by up to 2 px, some given another class, optionally one missed and one extra. */
function secondReaderCells(first: Cell[], rnd: Random, s: NonNullable<Plan['second']>): Cell[] {
  const reclassed = new Map<number, string>();
  const candidates = first.map((c, i) => ({ c, i })).filter(({ c }) => (s.toAbnormal ? c.classKey === 'normal' : true));
  while (reclassed.size < Math.min(s.reclass, candidates.length)) {
    const { c, i } = pick(rnd, candidates);
    if (!reclassed.has(i)) reclassed.set(i, c.classKey === 'normal' ? pick(rnd, DEFECTS) : 'normal');
  }
  const missed = s.missAndExtra ? first.findIndex((_, i) => !reclassed.has(i) && i > 10) : -1;
  const kept = first.length * (s.share ?? 1);
  const cells = first
    .map((c, i) => ({ ...c, x: Math.max(0, c.x + rnd() * 4 - 2), y: Math.max(0, c.y + rnd() * 4 - 2), classKey: reclassed.get(i) ?? c.classKey }))
    .filter((_, i) => i !== missed && i < kept);
  // An extra cell near the corner of the first image, where no drawn cell sits.
  if (s.missAndExtra) cells.push({ imageId: first[0]!.imageId, x: 14, y: 14, classKey: 'distal_droplet' });
  return cells;
}

export async function seed(knex: Knex): Promise<void> {
  const [tech, reader, set] = await Promise.all([
    knex('users').where({ email: DEMO_RECORDERS.collections }).first('id'),
    knex('users').where({ email: 'reader@quillfield.example' }).first('id'),
    knex('class_sets').where({ is_default: true }).first(),
  ]);
  if (!tech || !reader || !set) throw new Error('Seed 07 needs the demo users and the default class set (seeds 01 and 05).');
  const classSet = { id: set.id as number, snapshot: JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes }) };

  const dir = await mkdtemp(join(tmpdir(), 'fieldmark-seed-'));
  try {
    for (const p of PLAN) {
      const stallion = DEMO_STALLIONS.find((s) => s.key === p.stallionKey)!;
      const c = await collectionNear(knex, stallion.registration, p.date);
      if (!c || c.signed_report_id) continue;
      if (await knex('field_images').where({ collection_id: c.id }).first('id')) continue;
      if (await knex('reads').where({ collection_id: c.id }).first('id')) continue;
      const first: Cell[] = [];
      for (let i = 0; i < FIELD.images; i++) {
        const field = await generateField({ seed: p.seed + i, width: FIELD.width, height: FIELD.height, micronsPerPixel: FIELD.micronsPerPixel, cells: { total: FIELD.cellsPerImage, weights: WEIGHTS }, format: 'jpeg' });
        const file = join(dir, `field-${c.id}-${i + 1}.jpg`);
        await writeFile(file, field.image);
        const stored = await storeFieldImage(knex, storage, { collectionId: c.id, filePath: file, fileName: `field-${String(i + 1).padStart(2, '0')}.jpg`, uploadedBy: tech.id, micronsPerPixel: FIELD.micronsPerPixel, magnification: c.magnification, optics: c.optics }, UPLOAD_LIMITS);
        if (!stored.ok) throw new Error(`seed image refused: ${stored.message}`);
        for (const cell of field.cells) first.push({ imageId: stored.id, x: cell.x, y: cell.y, classKey: cell.classKey });
      }
      const at = new Date(new Date(c.collected_at).getTime() + 3 * 3600e3);
      await knex.transaction(async (trx) => {
        await insertRead(trx, classSet, c.id, FIRST_READ, tech.id, SUBMITTED, at, first);
        if (p.second) {
          const cells = secondReaderCells(first, mulberry32(p.seed + 50), p.second);
          await insertRead(trx, classSet, c.id, SECOND_READ, reader.id, p.second.status, new Date(at.getTime() + 24 * 3600e3), cells);
        }
      });
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
