import { keyLabel } from '@/lib/settling/keys';

/** A key as a key cap beside a button's words; hidden from screen readers (the button carries aria-keyshortcuts). */
export function KeyCap({ k }: { k: string }) {
  return (
    <kbd aria-hidden="true" className="rounded border border-line bg-paper px-1.5 font-mono text-xs text-ink-soft">
      {keyLabel(k).toUpperCase()}
    </kbd>
  );
}
