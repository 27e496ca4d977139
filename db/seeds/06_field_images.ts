import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Knex } from 'knex';
import { DEMO_FEVER, DEMO_RECORDERS, DEMO_STALLIONS, expectedAbnormalShare } from '../../lib/demo/scenario';
import { UPLOAD_LIMITS } from '../../lib/images/limits';
import { FIRST_READ, SUBMITTED } from '../../lib/reads/kinds';
import { storeFieldImage } from '../../lib/images/store';
import { DEFAULT_CLASS_WEIGHTS, generateField } from '../../lib/synthetic/generate-field';
import { SPERM_CLASS_KEYS } from '../../lib/synthetic/sperm';
import * as storage from '../../storage/s3-core';

/**
 * Synthetic field images for a few demo collections, with submitted first reads whose marks
 * sit on the drawn cells (the ground truth): the fever stallion before, inside and after his
 * spermatogenic window, and one newer collection left unread for the demo technician.
 * Re-runnable: a collection that already has images is left alone.
 */
const FIELD = { width: 2000, height: 1500, micronsPerPixel: 0.3, cellsPerImage: 30 };

function weightsFor(abnormalShare: number) {
  const defects = SPERM_CLASS_KEYS.filter((k) => k !== 'normal');
  const defectTotal = defects.reduce((s, k) => s + DEFAULT_CLASS_WEIGHTS[k], 0);
  return Object.fromEntries([['normal', 1 - abnormalShare], ...defects.map((k) => [k, (abnormalShare * DEFAULT_CLASS_WEIGHTS[k]) / defectTotal])]);
}

async function nearestCollection(knex: Knex, registration: string, date: string) {
  return knex('collections as k')
    .join('stallions as s', 's.id', 'k.stallion_id')
    .where('s.registration', registration)
    .orderByRaw('abs(timestampdiff(second, k.collected_at, ?))', [`${date} 09:00:00`])
    .first('k.id', 'k.collected_at', 'k.magnification', 'k.optics');
}

export async function seed(knex: Knex): Promise<void> {
  const tech = await knex('users').where({ email: DEMO_RECORDERS.collections }).first('id');
  const set = await knex('class_sets').where({ is_default: true }).first();
  if (!tech || !set) throw new Error('Seed 06 needs the demo users and the default class set (seeds 01 and 05).');
  const plan = [
    { registration: DEMO_FEVER.stallionRegistration, date: '2026-04-20', images: 7, read: true },
    { registration: DEMO_FEVER.stallionRegistration, date: '2026-06-10', images: 7, read: true },
    { registration: DEMO_FEVER.stallionRegistration, date: '2026-07-28', images: 7, read: true },
    { registration: DEMO_STALLIONS[1].registration, date: '2026-07-28', images: 3, read: false },
  ];
  const dir = await mkdtemp(join(tmpdir(), 'fieldmark-seed-'));
  try {
    for (const [p, step] of plan.entries()) {
      const c = await nearestCollection(knex, step.registration, step.date);
      if (!c) continue;
      if (await knex('field_images').where({ collection_id: c.id }).first('id')) continue;
      const share = expectedAbnormalShare(step.registration, new Date(c.collected_at));
      const marks: { imageId: number; x: number; y: number; classKey: string }[] = [];
      for (let i = 0; i < step.images; i++) {
        const field = await generateField({ seed: 1000 * (p + 1) + i, width: FIELD.width, height: FIELD.height, micronsPerPixel: FIELD.micronsPerPixel, cells: { total: FIELD.cellsPerImage, weights: weightsFor(share) }, format: 'jpeg' });
        const file = join(dir, `field-${c.id}-${i + 1}.jpg`);
        await writeFile(file, field.image);
        const stored = await storeFieldImage(knex, storage, { collectionId: c.id, filePath: file, fileName: `field-${String(i + 1).padStart(2, '0')}.jpg`, uploadedBy: tech.id, micronsPerPixel: FIELD.micronsPerPixel, magnification: c.magnification, optics: c.optics }, UPLOAD_LIMITS);
        if (!stored.ok) throw new Error(`seed image refused: ${stored.message}`);
        for (const cell of field.cells) marks.push({ imageId: stored.id, x: cell.x, y: cell.y, classKey: cell.classKey });
      }
      if (!step.read) continue;
      const [readId] = await knex('reads').insert({
        collection_id: c.id, kind: FIRST_READ, reader_id: tech.id, class_set_id: set.id,
        class_set_snapshot: JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes }),
        target_cells: 200, status: SUBMITTED, submitted_at: new Date(new Date(c.collected_at).getTime() + 3 * 3600e3),
      });
      await knex('marks').insert(
        marks.map((m) => ({
          id: crypto.randomUUID(), read_id: readId, image_id: m.imageId, x: Math.round(m.x * 100) / 100, y: Math.round(m.y * 100) / 100, class_key: m.classKey, tags: '[]',
          version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: tech.id,
        })),
      );
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
