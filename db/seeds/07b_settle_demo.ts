import type { Knex } from 'knex';
import { DEMO_RECORDERS, DEMO_STALLIONS } from '../../lib/demo/scenario';
import { addImagesAndFirstRead, addSecondRead, nearestCollection } from './09_reports';

/*
 * Settling in the demo: two more collections read twice, so the settle view and the reader-quality
 * page have something to show after `npm start`.
 * - Copperline Drifter, 24 June (its nearest collection, 25 June): first read by the technician, blind second read by the second
 *   reader with eleven disagreements (nine cells given other classes, one missed, one extra),
 *   left unsettled for the "disagreements to settle" work.
 * - Saffron Tideglass, 8 July: second read by the veterinarian, settled by her through the app's
 *   settling transaction (seed 09's helpers), so a third reader appears on the quality page.
 * Re-runnable: images and reads are added only where missing.
 */
async function user(knex: Knex, email: string) {
  const u = await knex('users').where({ email }).first('id', 'name', 'role');
  if (!u) throw new Error(`Seed 07b needs the demo user ${email} (seed 01).`);
  return u;
}

export async function seed(knex: Knex): Promise<void> {
  const [tech, reader, vet] = await Promise.all([user(knex, DEMO_RECORDERS.collections), user(knex, 'reader@quillfield.example'), user(knex, 'vet@quillfield.example')]);
  const stallion = (key: string) => DEMO_STALLIONS.find((s) => s.key === key)!.registration;
  const june = await nearestCollection(knex, stallion('copperline-drifter'), '2026-06-24');
  const july = await nearestCollection(knex, stallion('saffron-tideglass'), '2026-07-08');
  if (!june || !july) throw new Error('Seed 07b needs the demo collections (seed 03).');

  await addImagesAndFirstRead(knex, june.id, tech, 7100);
  await knex.transaction((trx) => addSecondRead(trx, june.id, 7101, reader, { changes: 9, missAndExtra: true, settle: false }));
  await addImagesAndFirstRead(knex, july.id, tech, 7200);
  await knex.transaction((trx) => addSecondRead(trx, july.id, 7201, vet, { changes: 5, missAndExtra: true, settle: true }));
}
