'use client';

import { useEffect } from 'react';
import { commandForKey, isControl, isTextEntry, type KeyContext, type WorkbenchCommand } from '@/lib/scoring/keys';
import { useLatest } from './use-latest';

export interface WorkbenchKeys {
  /** False while a dialog is open: its keys are its own. */
  enabled: boolean;
  context: Omit<KeyContext, 'onControl' | 'canvasFocused'>;
  canvasFocused(): boolean;
  /** Runs a command; returns whether it did something (used for 'if-handled' keys). */
  run(command: WorkbenchCommand): boolean;
  /** Space released, or the window lost focus: end a Space-drag pan. */
  endSpacePan(): void;
}

/** One keyboard handler on the window for the whole workbench (see the "Keys and mouse" help). */
export function useWorkbenchKeys(keys: WorkbenchKeys): void {
  const latest = useLatest(keys);
  useEffect(() => {
    const down = (e: KeyboardEvent) => {
      const k = latest.current;
      if (e.defaultPrevented || !k.enabled || isTextEntry(e.target)) return;
      const outcome = commandForKey(e, { ...k.context, onControl: isControl(e.target), canvasFocused: k.canvasFocused() });
      if (!outcome) return;
      const handled = outcome.command ? k.run(outcome.command) : false;
      if (outcome.preventDefault === true || (outcome.preventDefault === 'if-handled' && handled)) e.preventDefault();
    };
    const up = (e: KeyboardEvent) => {
      if (e.key === ' ') latest.current.endSpacePan();
    };
    const blur = () => latest.current.endSpacePan();
    window.addEventListener('keydown', down);
    window.addEventListener('keyup', up);
    window.addEventListener('blur', blur);
    return () => {
      window.removeEventListener('keydown', down);
      window.removeEventListener('keyup', up);
      window.removeEventListener('blur', blur);
    };
  }, [latest]);
}
