import { classForHotkey, type ClassSet } from '@/lib/class-sets/schema';

/*
 * The scoring workbench's keys as data: a key press (and what it landed on) becomes one command.
 * The workbench runs the command; the shortcut help (components/scoring/keys-help.tsx) says the
 * same in words. Pure, so every key is unit-tested without a browser.
 */

export type WorkbenchCommand =
  | { type: 'undo' }
  | { type: 'redo' }
  | { type: 'space-pan' }
  | { type: 'pan'; key: string; shift: boolean }
  | { type: 'deselect' }
  | { type: 'delete-selected' }
  | { type: 'reclassify-selected'; classKey: string }
  | { type: 'choose-class'; classKey: string }
  | { type: 'zoom'; direction: 'in' | 'out' }
  | { type: 'press-centre' }
  | { type: 'fit' }
  | { type: 'toggle-marks' }
  | { type: 'toggle-tags' }
  | { type: 'image'; step: -1 | 1 }
  | { type: 'toggle-walk' }
  | { type: 'walk-classify'; classKey: string }
  | { type: 'walk-skip' };

export interface KeyPress {
  key: string;
  ctrlKey: boolean;
  metaKey: boolean;
  shiftKey: boolean;
  altKey: boolean;
  repeat: boolean;
}

export interface KeyContext {
  classSet: Pick<ClassSet, 'classes'>;
  /** A mark is selected. */
  hasSelection: boolean;
  canEdit: boolean;
  /** The key landed on a button or a non-text input (Space activates it there). */
  onControl: boolean;
  /** Keyboard focus is on the canvas itself (Enter marks at the centre cross there). */
  canvasFocused: boolean;
  /** The cell walk stands on a candidate of an editable read: a class key classifies it. */
  walking?: boolean;
}


/**
 * What to do with the key: `preventDefault` is true when the browser's own action must not run,
 * 'if-handled' when that depends on the command doing something (an arrow pans only an image).
 * A null command with preventDefault true swallows the key (a held Space repeating).
 */
export type KeyOutcome = { command: WorkbenchCommand | null; preventDefault: boolean | 'if-handled' };

const run = (command: WorkbenchCommand, preventDefault: KeyOutcome['preventDefault'] = true): KeyOutcome => ({ command, preventDefault });

/** The cell walk's name on screen (our own). */
export const WALK_NAME = 'Cell walk';

/**
 * Letter and symbol commands with their words: commandForKey runs them and the "Keys and mouse"
 * help (components/scoring/keys-help.tsx) lists them, so a key cannot drift from its help.
 */
export interface KeyEntry {
  /** Keys as KeyboardEvent.key gives them. */
  keys: readonly string[];
  /** The keys as the help shows them. */
  label: string;
  help: string;
  command(ctx: KeyContext): KeyOutcome | null;
}

export const KEY_TABLE: readonly KeyEntry[] = [
  {
    keys: ['w', 'W'],
    label: 'w',
    help: `starts or stops the ${WALK_NAME}: the view goes from one found cell to the next, row by row across the image, and on to the next image. Press a class key for the cell in the ring; the view moves on by itself.`,
    command: () => run({ type: 'toggle-walk' }, false),
  },
  {
    keys: ['x', 'X'],
    label: 'x',
    help: `in the ${WALK_NAME}: not a cell — skip it (never counted). Ctrl+Z goes back to it.`,
    command: (ctx) => (ctx.walking && ctx.canEdit ? run({ type: 'walk-skip' }, false) : null),
  },
  { keys: ['+', '='], label: '+', help: 'zooms in', command: () => run({ type: 'zoom', direction: 'in' }) },
  { keys: ['-', '_'], label: '−', help: 'zooms out', command: () => run({ type: 'zoom', direction: 'out' }) },
  { keys: ['f', 'F'], label: 'f', help: 'fits the image', command: () => run({ type: 'fit' }, false) },
  { keys: ['h', 'H'], label: 'h', help: 'hides or shows the marks', command: () => run({ type: 'toggle-marks' }, false) },
  {
    keys: ['t', 'T'],
    label: 't',
    help: 'opens the extra-defect checklist of the selected mark',
    command: (ctx) => (ctx.hasSelection && ctx.canEdit ? run({ type: 'toggle-tags' }, false) : null),
  },
  { keys: ['['], label: '[', help: 'goes to the previous image', command: () => run({ type: 'image', step: -1 }, false) },
  { keys: [']'], label: ']', help: 'goes to the next image', command: () => run({ type: 'image', step: 1 }, false) },
];

const BY_KEY = new Map(KEY_TABLE.flatMap((e) => e.keys.map((k) => [k, e] as const)));

/** The command for a key press on the workbench, or null when the key is not ours. */
export function commandForKey(e: KeyPress, ctx: KeyContext): KeyOutcome | null {
  const key = e.key;
  if (e.ctrlKey || e.metaKey) {
    const k = key.toLowerCase();
    if (k === 'z') return run(e.shiftKey ? { type: 'redo' } : { type: 'undo' });
    if (k === 'y') return run({ type: 'redo' });
    return null;
  }
  if (e.altKey) return null;
  if (key === ' ') {
    if (ctx.onControl) return null;
    return { command: e.repeat ? null : { type: 'space-pan' }, preventDefault: true };
  }
  if (key.startsWith('Arrow')) return run({ type: 'pan', key, shift: e.shiftKey }, 'if-handled');
  if (key === 'Escape') return run({ type: 'deselect' }, false);
  if ((key === 'Delete' || key === 'Backspace') && ctx.hasSelection) return run({ type: 'delete-selected' });
  // Class hotkeys come before letter commands, so a lab may give any letter to a class.
  const cls = key.length === 1 ? classForHotkey(ctx.classSet, key) : null;
  if (cls) {
    if (ctx.hasSelection && ctx.canEdit) return run({ type: 'reclassify-selected', classKey: cls.key });
    if (ctx.walking && ctx.canEdit) return run({ type: 'walk-classify', classKey: cls.key });
    return run({ type: 'choose-class', classKey: cls.key });
  }
  if (key === 'Enter') {
    // Only on the canvas itself: Enter on a button or link keeps its usual meaning.
    return ctx.canvasFocused ? run({ type: 'press-centre' }) : null;
  }
  return BY_KEY.get(key)?.command(ctx) ?? null;
}

/** Whether an element takes typed text (keys there are the user's, not the workbench's). */
export function isTextEntry(el: EventTarget | null): boolean {
  if (typeof HTMLElement === 'undefined' || !(el instanceof HTMLElement)) return false;
  if (el.isContentEditable) return true;
  if (el instanceof HTMLTextAreaElement || el instanceof HTMLSelectElement) return true;
  if (el instanceof HTMLInputElement) return !['checkbox', 'radio', 'button', 'submit', 'range'].includes(el.type);
  return false;
}

/** A button or a non-text input: Space and Enter keep their meaning there. */
export function isControl(el: EventTarget | null): boolean {
  if (typeof HTMLElement === 'undefined') return false;
  return el instanceof HTMLButtonElement || (el instanceof HTMLInputElement && el.type !== 'text');
}
