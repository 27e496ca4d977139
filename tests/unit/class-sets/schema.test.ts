import { describe, expect, it } from 'vitest';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { classSetSchema, markClassSchema, type ClassSet, type MarkClass } from '@/lib/class-sets/schema';

const base: MarkClass = {
  key: 'normal',
  name: 'Normal',
  group: 'normal',
  hotkey: '1',
  colour: '#009E73',
  shape: 'circle',
  countsAsSperm: true,
};

function set(classes: MarkClass[]): ClassSet {
  return { name: 'Test set', classes };
}

function messages(input: unknown): string[] {
  const r = classSetSchema.safeParse(input);
  return r.success ? [] : r.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
}

describe('class set schema', () => {
  it('accepts a minimal set with one normal class', () => {
    expect(messages(set([base]))).toEqual([]);
  });

  it('needs at least one class in the normal group', () => {
    const out = messages(set([{ ...base, group: 'head', key: 'abnormal_head' }]));
    expect(out.some((m) => m.includes('normal group'))).toBe(true);
  });

  it('refuses duplicate keys and hotkeys', () => {
    const dupKey = messages(set([base, { ...base, name: 'Two', hotkey: '2', shape: 'square' }]));
    expect(dupKey.some((m) => m.startsWith('classes.1.key'))).toBe(true);
    const dupHot = messages(set([base, { ...base, key: 'b', name: 'Two', shape: 'square' }]));
    expect(dupHot.some((m) => m.startsWith('classes.1.hotkey'))).toBe(true);
  });

  it('refuses two classes with the same colour and shape', () => {
    const out = messages(set([base, { ...base, key: 'b', name: 'Two', hotkey: '2', colour: '#009e73' }]));
    expect(out.some((m) => m.startsWith('classes.1.shape'))).toBe(true);
  });

  it('checks name length 1–60, colour format and shape enum', () => {
    expect(markClassSchema.safeParse({ ...base, name: '' }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, name: 'x'.repeat(61) }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, name: 'x'.repeat(60) }).success).toBe(true);
    expect(markClassSchema.safeParse({ ...base, colour: '#0f0' }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, colour: 'green' }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, shape: 'blob' }).success).toBe(false);
  });

  it('keeps sperm classes on digit keys and non-sperm classes out of the sperm count', () => {
    expect(markClassSchema.safeParse({ ...base, hotkey: 'n' }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, hotkey: '12' }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, hotkey: null }).success).toBe(true);
    const roundCell = { ...base, key: 'round_cell', name: 'Round cell', group: 'non_sperm', hotkey: 'r', countsAsSperm: false };
    expect(markClassSchema.safeParse(roundCell).success).toBe(true);
    expect(markClassSchema.safeParse({ ...roundCell, countsAsSperm: true }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, countsAsSperm: false }).success).toBe(false);
  });

  it('refuses a key that is not a slug', () => {
    expect(markClassSchema.safeParse({ ...base, key: 'Normal cell' }).success).toBe(false);
    expect(markClassSchema.safeParse({ ...base, key: '1normal' }).success).toBe(false);
  });

  it('reports a clash inside the default set when a class is added carelessly', () => {
    const copy = set([...DEFAULT_CLASS_SET.classes, { ...base, key: 'normal_2', name: 'Normal 2', hotkey: '1', shape: 'square' }]);
    expect(messages(copy).some((m) => m.includes('hotkey'))).toBe(true);
  });
});
