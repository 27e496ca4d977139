import { z } from 'zod';

/** Marker shapes the scoring canvas can draw (geometry in lib/scoring/shapes.ts). */
export const MARKER_SHAPES = [
  'circle',
  'ring',
  'square',
  'diamond',
  'triangle-up',
  'triangle-down',
  'pentagon',
  'hexagon',
  'star',
  'cross',
  'plus',
  'hourglass',
] as const;
export type MarkerShape = (typeof MARKER_SHAPES)[number];

/**
 * 'non_sperm' is ours: round cells and leukocytes are tallied apart and must never
 * fall into a sperm group total.
 */
export const CLASS_GROUPS = ['normal', 'head', 'midpiece', 'droplet', 'tail', 'other', 'non_sperm'] as const;
export type ClassGroup = (typeof CLASS_GROUPS)[number];

const SLUG = /^[a-z][a-z0-9_]{0,39}$/;
const COLOUR = /^#[0-9A-Fa-f]{6}$/;
/** Sperm classes use the digit row; non-sperm extras may use a single letter. */
const HOTKEY = /^[0-9a-z]$/;

export const markClassSchema = z
  .object({
    key: z.string().regex(SLUG, 'Use lower-case letters, digits and _ (start with a letter, at most 40)'),
    name: z.string().trim().min(1).max(60),
    group: z.enum(CLASS_GROUPS),
    hotkey: z.string().regex(HOTKEY, 'A hotkey is one digit 0–9 or one letter a–z').nullable(),
    colour: z.string().regex(COLOUR, 'Colour must be #RRGGBB'),
    shape: z.enum(MARKER_SHAPES),
    countsAsSperm: z.boolean(),
  })
  .superRefine((c, ctx) => {
    // A non-sperm class counted as sperm (or the reverse) would corrupt the % figures.
    if ((c.group === 'non_sperm') === c.countsAsSperm) {
      ctx.addIssue({
        code: 'custom',
        path: ['countsAsSperm'],
        message: 'Only classes in the non-sperm group are tallied apart from sperm',
      });
    }
    if (c.countsAsSperm && c.hotkey !== null && !/^[0-9]$/.test(c.hotkey)) {
      ctx.addIssue({ code: 'custom', path: ['hotkey'], message: 'Sperm classes use the keys 0–9' });
    }
  });
export type MarkClass = z.infer<typeof markClassSchema>;

export const classSetSchema = z
  .object({
    name: z.string().trim().min(1).max(60),
    classes: z.array(markClassSchema).min(1).max(40),
  })
  .superRefine((set, ctx) => {
    const seen = (pick: (c: MarkClass) => string | null, field: keyof MarkClass, what: string) => {
      const first = new Map<string, number>();
      set.classes.forEach((c, i) => {
        const v = pick(c);
        if (v === null) return;
        const prev = first.get(v);
        if (prev !== undefined) {
          ctx.addIssue({
            code: 'custom',
            path: ['classes', i, field],
            message: `${what} "${v}" is already used by class ${prev + 1}`,
          });
        } else first.set(v, i);
      });
    };
    seen((c) => c.key, 'key', 'Key');
    seen((c) => c.hotkey, 'hotkey', 'Hotkey');
    seen((c) => c.name.trim().toLowerCase(), 'name', 'Name');
    seen((c) => `${c.colour.toUpperCase()} ${c.shape}`, 'shape', 'Colour and shape');
    if (!set.classes.some((c) => c.group === 'normal')) {
      ctx.addIssue({ code: 'custom', path: ['classes'], message: 'A class set needs at least one class in the normal group' });
    }
  });
export type ClassSet = z.infer<typeof classSetSchema>;

/** The class a pressed key selects, or null. Keys are matched case-insensitively. */
export function classForHotkey(set: Pick<ClassSet, 'classes'>, key: string): MarkClass | null {
  const k = key.toLowerCase();
  return set.classes.find((c) => c.hotkey === k) ?? null;
}
