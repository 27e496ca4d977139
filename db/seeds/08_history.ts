import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Knex } from 'knex';
import { DEMO_FEVER, DEMO_HISTORY_READ_DATES, DEMO_RECORDERS, demoClassWeights, expectedAbnormalShare } from '../../lib/demo/scenario';
import { UPLOAD_LIMITS } from '../../lib/images/limits';
import { FIRST_READ, SUBMITTED } from '../../lib/reads/kinds';
import { storeFieldImage } from '../../lib/images/store';
import { DEFAULT_CLASS_WEIGHTS, generateField } from '../../lib/synthetic/generate-field';
import * as storage from '../../storage/s3-core';

/**
 * The fever stallion's history: his fever of 4–6 May recorded as a health event (with its peak
 * temperature), and submitted first reads on collections before, inside and after its window,
 * each a synthetic field image of 200 drawn cells whose classes follow the scenario's own
 * abnormal share for that day (expectedAbnormalShare), marked where the cells are drawn. With
 * seed 06's three reads the history chart shows the dip and the recovery.
 * Deterministic (seeded PRNG in generateField) and re-runnable: the event is matched by stallion,
 * kind and start date; a collection that already has a read or images is left alone.
 */
const FIELD = { width: 3000, height: 2250, micronsPerPixel: 0.3, cells: 200 };

async function nearestCollection(knex: Knex, stallionId: number, date: string) {
  return knex('collections')
    .where({ stallion_id: stallionId })
    .orderByRaw('abs(timestampdiff(second, collected_at, ?))', [`${date} 09:00:00`])
    .first('id', 'collected_at', 'magnification', 'optics');
}

export async function seed(knex: Knex): Promise<void> {
  const [tech, vet, set, stallion] = await Promise.all([
    knex('users').where({ email: DEMO_RECORDERS.collections }).first('id'),
    knex('users').where({ email: DEMO_RECORDERS.testis }).first('id'),
    knex('class_sets').where({ is_default: true }).first(),
    knex('stallions').where({ registration: DEMO_FEVER.stallionRegistration }).first('id'),
  ]);
  if (!tech || !vet || !set || !stallion) throw new Error('Seed 08 needs the demo users, stallions and the default class set (seeds 01, 02 and 05).');

  const fever = { stallion_id: stallion.id, kind: 'fever', started_on: DEMO_FEVER.date };
  if (!(await knex('health_events').where(fever).first('id'))) {
    await knex.transaction(async (trx) => {
      const row = { ...fever, ended_on: DEMO_FEVER.endDate, peak_temperature_c: DEMO_FEVER.temperatureC, notes: DEMO_FEVER.notes, recorded_by: vet.id };
      const [id] = await trx('health_events').insert(row);
      await trx('audit_log').insert({ user_id: vet.id, action: 'create', entity: 'health_event', entity_id: String(id), after: JSON.stringify(row) });
    });
  }

  const snapshot = JSON.stringify({ name: set.name, classes: typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes });
  const dir = await mkdtemp(join(tmpdir(), 'fieldmark-seed-'));
  try {
    for (const [i, date] of DEMO_HISTORY_READ_DATES.entries()) {
      const c = await nearestCollection(knex, stallion.id, date);
      if (!c) continue;
      const busy = (await knex('reads').where({ collection_id: c.id }).first('id')) || (await knex('field_images').where({ collection_id: c.id }).first('id'));
      if (busy) continue;
      const share = expectedAbnormalShare(DEMO_FEVER.stallionRegistration, new Date(c.collected_at));
      const field = await generateField({
        seed: 8000 + i, width: FIELD.width, height: FIELD.height, micronsPerPixel: FIELD.micronsPerPixel,
        cells: { total: FIELD.cells, weights: demoClassWeights(share, DEFAULT_CLASS_WEIGHTS) }, format: 'jpeg',
      });
      const file = join(dir, `field-${c.id}.jpg`);
      await writeFile(file, field.image);
      const stored = await storeFieldImage(knex, storage, { collectionId: c.id, filePath: file, fileName: 'field-01.jpg', uploadedBy: tech.id, micronsPerPixel: FIELD.micronsPerPixel, magnification: c.magnification, optics: c.optics }, UPLOAD_LIMITS);
      if (!stored.ok) throw new Error(`seed image refused: ${stored.message}`);
      await knex.transaction(async (trx) => {
        const [readId] = await trx('reads').insert({
          collection_id: c.id, kind: FIRST_READ, reader_id: tech.id, class_set_id: set.id, class_set_snapshot: snapshot,
          target_cells: FIELD.cells, status: SUBMITTED, submitted_at: new Date(new Date(c.collected_at).getTime() + 3 * 3600e3),
        });
        await trx('marks').insert(
          field.cells.map((cell) => ({
            id: crypto.randomUUID(), read_id: readId, image_id: stored.id, x: Math.round(cell.x * 100) / 100, y: Math.round(cell.y * 100) / 100,
            class_key: cell.classKey, tags: '[]', version: 1, deleted: false, last_op_id: crypto.randomUUID(), updated_by: tech.id,
          })),
        );
      });
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
