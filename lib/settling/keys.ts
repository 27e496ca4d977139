import { classForHotkey, type ClassSet } from '@/lib/class-sets/schema';
import type { KeyPress } from '@/lib/scoring/keys';

/*
 * The settle view's keys as one table: each command has its keys and its words, and the view's
 * key handler, its buttons' key hints and its help list are all read from here, so a key cannot
 * drift from its help text. Pure, so every key is unit-tested without a browser.
 *
 * The class picker ("another class") takes the class set's own keys while it is open; everywhere
 * else the letters below are the view's, so no class key can shadow a command.
 */

export type SettleCommandId =
  | 'first'
  | 'second'
  | 'not-cell'
  | 'pick-class'
  | 'next'
  | 'previous'
  | 'next-undecided'
  | 'zoom-in'
  | 'zoom-out'
  | 'centre';

export interface SettleCommandSpec {
  id: SettleCommandId;
  /** KeyboardEvent.key values; the first is the one shown. */
  keys: readonly string[];
  /** What the help list says the key does. */
  help: string;
}

export const SETTLE_COMMANDS: readonly SettleCommandSpec[] = [
  { id: 'first', keys: ['a'], help: 'Settle on the first reader’s class (where only the second reader marked a cell: not a cell)' },
  { id: 'second', keys: ['s'], help: 'Settle on the second reader’s class (where only the first reader marked a cell: not a cell)' },
  { id: 'pick-class', keys: ['o'], help: 'Another class: opens the class list; press the class’s own key or click it (Escape closes it)' },
  { id: 'not-cell', keys: ['x'], help: 'Not a cell: the settled read has no mark here' },
  { id: 'next', keys: ['n', 'ArrowRight'], help: 'Next disagreement' },
  { id: 'previous', keys: ['p', 'ArrowLeft'], help: 'Previous disagreement' },
  { id: 'next-undecided', keys: ['u'], help: 'Next disagreement not yet settled' },
  { id: 'zoom-in', keys: ['+', '='], help: 'Zoom in' },
  { id: 'zoom-out', keys: ['-', '_'], help: 'Zoom out' },
  { id: 'centre', keys: ['c'], help: 'Centre both images on the disagreement again' },
];

export const settleCommand = (id: SettleCommandId): SettleCommandSpec => SETTLE_COMMANDS.find((c) => c.id === id)!;

/** The key to show beside a command's button. */
export const keyHint = (id: SettleCommandId): string => settleCommand(id).keys[0]!;

/** How a key is written in the help ("ArrowRight" as →). */
export function keyLabel(key: string): string {
  return { ArrowRight: '→', ArrowLeft: '←' }[key] ?? key;
}

export type SettleKeyAction = { type: 'command'; id: SettleCommandId } | { type: 'class'; classKey: string } | { type: 'close-picker' };

/** What a key press does in the settle view, or null when the key is not ours. */
export function settleActionForKey(e: KeyPress, ctx: { pickerOpen: boolean; classSet: Pick<ClassSet, 'classes'> }): SettleKeyAction | null {
  if (e.ctrlKey || e.metaKey || e.altKey || e.repeat) return null;
  if (ctx.pickerOpen) {
    if (e.key === 'Escape') return { type: 'close-picker' };
    const cls = e.key.length === 1 ? classForHotkey(ctx.classSet, e.key) : null;
    return cls ? { type: 'class', classKey: cls.key } : null;
  }
  const key = e.key.length === 1 ? e.key.toLowerCase() : e.key;
  const cmd = SETTLE_COMMANDS.find((c) => c.keys.includes(key) || c.keys.includes(e.key));
  return cmd ? { type: 'command', id: cmd.id } : null;
}
