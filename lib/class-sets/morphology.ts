import type { MorphologyClass } from '@/lib/morphology/tally';
import type { MarkClass } from './schema';

/** The tally's view of a class set: non-sperm cells keep countsAsSperm false and sit outside the sperm groups. */
export function toMorphologyClasses(classes: readonly MarkClass[]): MorphologyClass[] {
  return classes.map((c) => ({ id: c.key, name: c.name, group: c.group === 'non_sperm' ? 'other' : c.group, countsAsSperm: c.countsAsSperm }));
}
