import type { Knex } from 'knex';
import { DEFAULT_CLASS_SET } from '../../lib/class-sets/default-set';

// The default equine class set; re-runnable (kept as it is once it exists, since a lab may have edited it).
export async function seed(knex: Knex): Promise<void> {
  const existing = await knex('class_sets').where({ name: DEFAULT_CLASS_SET.name }).first();
  if (existing) return;
  const hasDefault = await knex('class_sets').where({ is_default: true }).first();
  await knex('class_sets').insert({ name: DEFAULT_CLASS_SET.name, is_default: !hasDefault, classes: JSON.stringify(DEFAULT_CLASS_SET.classes) });
}
