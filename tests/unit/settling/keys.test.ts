import { describe, expect, it } from 'vitest';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { SETTLE_COMMANDS, settleActionForKey } from '@/lib/settling/keys';

const press = (key: string, over: Partial<KeyboardEventInit> = {}) => ({ key, ctrlKey: false, metaKey: false, shiftKey: false, altKey: false, repeat: false, ...over });
const closed = { pickerOpen: false, classSet: DEFAULT_CLASS_SET };
const open = { pickerOpen: true, classSet: DEFAULT_CLASS_SET };

describe('settle keys', () => {
  it('give every command its own keys, none shared', () => {
    const all = SETTLE_COMMANDS.flatMap((c) => c.keys);
    expect(new Set(all).size).toBe(all.length);
    for (const c of SETTLE_COMMANDS) for (const k of c.keys) expect(settleActionForKey(press(k), closed)).toEqual({ type: 'command', id: c.id });
  });

  it('take no class key while the picker is closed (no class can shadow a command)', () => {
    expect(settleActionForKey(press('1'), closed)).toBeNull();
    expect(settleActionForKey(press('r'), closed)).toBeNull();
    expect(settleActionForKey(press('A', { shiftKey: true }), closed)).toEqual({ type: 'command', id: 'first' });
  });

  it('take the class set’s keys while the picker is open, and Escape closes it', () => {
    expect(settleActionForKey(press('5'), open)).toEqual({ type: 'class', classKey: 'abnormal_midpiece' });
    expect(settleActionForKey(press('l'), open)).toEqual({ type: 'class', classKey: 'leukocyte' });
    expect(settleActionForKey(press('a'), open)).toBeNull();
    expect(settleActionForKey(press('Escape'), open)).toEqual({ type: 'close-picker' });
  });

  it('leave modified and repeated keys alone', () => {
    expect(settleActionForKey(press('a', { ctrlKey: true }), closed)).toBeNull();
    expect(settleActionForKey(press('n', { repeat: true }), closed)).toBeNull();
  });
});
