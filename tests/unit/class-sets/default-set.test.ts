import { describe, expect, it } from 'vitest';
import { DEFAULT_CLASS_SET, OKABE_ITO } from '@/lib/class-sets/default-set';
import { classForHotkey, classSetSchema, MARKER_SHAPES } from '@/lib/class-sets/schema';

describe('default equine class set', () => {
  it('passes its own schema', () => {
    const r = classSetSchema.safeParse(DEFAULT_CLASS_SET);
    expect(r.success, JSON.stringify(r.error?.issues)).toBe(true);
  });

  it('lists the DESIGN.md classes in order with keys 1–9 then 0', () => {
    // Order and names: DESIGN.md "Default class set"
    const sperm = DEFAULT_CLASS_SET.classes.filter((c) => c.countsAsSperm);
    expect(sperm.map((c) => [c.hotkey, c.key, c.group])).toEqual([
      ['1', 'normal', 'normal'],
      ['2', 'abnormal_head', 'head'],
      ['3', 'acrosome_defect', 'head'],
      ['4', 'nuclear_vacuoles', 'head'],
      ['5', 'abnormal_midpiece', 'midpiece'],
      ['6', 'proximal_droplet', 'droplet'],
      ['7', 'distal_droplet', 'droplet'],
      ['8', 'bent_coiled_tail', 'tail'],
      ['9', 'detached_head', 'other'],
      ['0', 'other', 'other'],
    ]);
    expect(sperm.map((c) => c.name)).toEqual([
      'Normal',
      'Abnormal head shape or size',
      'Acrosome defect',
      'Nuclear vacuoles',
      'Abnormal midpiece',
      'Proximal cytoplasmic droplet',
      'Distal cytoplasmic droplet',
      'Bent or coiled tail',
      'Detached head',
      'Other (premature germ cells, multiple tails …)',
    ]);
  });

  it('tallies round cells and leukocytes apart, on letter keys', () => {
    const extra = DEFAULT_CLASS_SET.classes.filter((c) => !c.countsAsSperm);
    expect(extra.map((c) => [c.key, c.group, c.hotkey])).toEqual([
      ['round_cell', 'non_sperm', 'r'],
      ['leukocyte', 'non_sperm', 'l'],
    ]);
  });

  it('gives every class its own shape, and colours from Okabe–Ito (no black) or white/grey', () => {
    const shapes = DEFAULT_CLASS_SET.classes.map((c) => c.shape);
    expect(new Set(shapes).size).toBe(DEFAULT_CLASS_SET.classes.length);
    shapes.forEach((s) => expect(MARKER_SHAPES).toContain(s));
    // Palette: Okabe & Ito, "Color Universal Design" (hex values from memory), minus #000000
    const allowed = new Set<string>([...Object.values(OKABE_ITO), '#FFFFFF', '#BBBBBB']);
    for (const c of DEFAULT_CLASS_SET.classes) expect(allowed.has(c.colour)).toBe(true);
    expect(DEFAULT_CLASS_SET.classes.some((c) => c.colour === '#000000')).toBe(false);
  });

  it('finds a class by hotkey, ignoring case', () => {
    expect(classForHotkey(DEFAULT_CLASS_SET, '6')?.key).toBe('proximal_droplet');
    expect(classForHotkey(DEFAULT_CLASS_SET, 'L')?.key).toBe('leukocyte');
    expect(classForHotkey(DEFAULT_CLASS_SET, 'q')).toBeNull();
  });
});
