import { describe, expect, it } from 'vitest';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { commandForKey, type KeyContext, type KeyPress } from '@/lib/scoring/keys';

const press = (key: string, over: Partial<KeyPress> = {}): KeyPress => ({ key, ctrlKey: false, metaKey: false, shiftKey: false, altKey: false, repeat: false, ...over });
const ctx = (over: Partial<KeyContext> = {}): KeyContext => ({ classSet: DEFAULT_CLASS_SET, hasSelection: false, canEdit: true, onControl: false, canvasFocused: false, ...over });
const cmd = (key: string, p: Partial<KeyPress> = {}, c: Partial<KeyContext> = {}) => commandForKey(press(key, p), ctx(c));

describe('workbench keys', () => {
  it('undoes and redoes with Ctrl or ⌘', () => {
    expect(cmd('z', { ctrlKey: true })).toEqual({ command: { type: 'undo' }, preventDefault: true });
    expect(cmd('Z', { metaKey: true, shiftKey: true })).toEqual({ command: { type: 'redo' }, preventDefault: true });
    expect(cmd('y', { ctrlKey: true })).toEqual({ command: { type: 'redo' }, preventDefault: true });
    // Other Ctrl combinations (copy, reload …) stay the browser's.
    expect(cmd('c', { ctrlKey: true })).toBeNull();
    expect(cmd('1', { ctrlKey: true })).toBeNull();
    expect(cmd('1', { altKey: true })).toBeNull();
  });

  it('chooses a class by its key, or reclassifies the selected mark', () => {
    expect(cmd('2')).toEqual({ command: { type: 'choose-class', classKey: 'abnormal_head' }, preventDefault: true });
    expect(cmd('2', {}, { hasSelection: true })).toEqual({ command: { type: 'reclassify-selected', classKey: 'abnormal_head' }, preventDefault: true });
    // A locked read: the key only chooses the class for display.
    expect(cmd('2', {}, { hasSelection: true, canEdit: false })!.command).toEqual({ type: 'choose-class', classKey: 'abnormal_head' });
    // Letters of non-sperm classes, case-insensitive; they win over letter commands (l, r).
    expect(cmd('L')!.command).toEqual({ type: 'choose-class', classKey: 'leukocyte' });
    expect(cmd('r')!.command).toEqual({ type: 'choose-class', classKey: 'round_cell' });
  });

  it('gives a class key precedence over a letter command when a set uses the letter', () => {
    const set = { classes: DEFAULT_CLASS_SET.classes.map((c) => (c.key === 'leukocyte' ? { ...c, hotkey: 'h' } : c)) };
    expect(cmd('h', {}, { classSet: set })!.command).toEqual({ type: 'choose-class', classKey: 'leukocyte' });
    expect(cmd('h')!.command).toEqual({ type: 'toggle-marks' });
  });

  it('deletes only with a selection, and Escape deselects', () => {
    expect(cmd('Delete', {}, { hasSelection: true })).toEqual({ command: { type: 'delete-selected' }, preventDefault: true });
    expect(cmd('Backspace', {}, { hasSelection: true })!.command).toEqual({ type: 'delete-selected' });
    expect(cmd('Delete')).toBeNull();
    expect(cmd('Escape')).toEqual({ command: { type: 'deselect' }, preventDefault: false });
  });

  it('pans by arrows (when the canvas can), Space-drags except on a button, zooms and fits', () => {
    expect(cmd('ArrowLeft', { shiftKey: true })).toEqual({ command: { type: 'pan', key: 'ArrowLeft', shift: true }, preventDefault: 'if-handled' });
    expect(cmd(' ')).toEqual({ command: { type: 'space-pan' }, preventDefault: true });
    expect(cmd(' ', { repeat: true })).toEqual({ command: null, preventDefault: true });
    expect(cmd(' ', {}, { onControl: true })).toBeNull();
    expect(cmd('+')!.command).toEqual({ type: 'zoom', direction: 'in' });
    expect(cmd('=')!.command).toEqual({ type: 'zoom', direction: 'in' });
    expect(cmd('-')!.command).toEqual({ type: 'zoom', direction: 'out' });
    expect(cmd('f')).toEqual({ command: { type: 'fit' }, preventDefault: false });
  });

  it('marks at the centre cross with Enter only when the canvas has focus', () => {
    expect(cmd('Enter', {}, { canvasFocused: true })).toEqual({ command: { type: 'press-centre' }, preventDefault: true });
    expect(cmd('Enter')).toBeNull();
  });

  it('opens the tag list of an editable selection, and steps through images', () => {
    expect(cmd('t', {}, { hasSelection: true })!.command).toEqual({ type: 'toggle-tags' });
    expect(cmd('t')).toBeNull();
    expect(cmd('T', {}, { hasSelection: true, canEdit: false })).toBeNull();
    expect(cmd('[')!.command).toEqual({ type: 'image', step: -1 });
    expect(cmd(']')!.command).toEqual({ type: 'image', step: 1 });
    expect(cmd('q')).toBeNull();
  });
});
