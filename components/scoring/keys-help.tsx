import { KEY_TABLE, WALK_NAME } from '@/lib/scoring/keys';

/** The workbench's keys and mouse, in words; the letter keys come from their table in lib/scoring/keys.ts. */
export function KeysHelp() {
  return (
    <details className="text-xs text-ink-soft">
      <summary className="cursor-pointer text-sm font-medium text-ink">Keys and mouse</summary>
      <ul id="scoring-canvas-help" className="mt-1 list-disc space-y-0.5 pl-4">
        <li>Press a class key (digits; letters for non-sperm cells), then click a cell to mark it.</li>
        <li>“Keep this class” on: every click uses the chosen class. Off: the new mark is selected and the next key sets its class.</li>
        <li>Click a mark to select it; a class key then changes its class. Drag a mark to move it.</li>
        <li>
          Faint rings are cells Fieldmark found: suggestions only. You decide every cell — mark the cells it missed by clicking, skip what is not a
          cell, and the {WALK_NAME} counts a ring as done only once you have marked or skipped it.
        </li>
        <li>Without a mouse: Tab to the image, pan a cell under the centre cross with the arrow keys, and press Enter to mark it (or to select the mark already there).</li>
        <li>Delete or Backspace removes the selected mark; Escape deselects.</li>
        <li>Ctrl+Z undo (in the {WALK_NAME} it goes back to the cell); Ctrl+Shift+Z or Ctrl+Y redo (⌘ on a Mac).</li>
        <li>Drag empty space, Space+drag or the arrow keys (Shift: faster) pan; the wheel zooms.</li>
        {KEY_TABLE.map((k) => (
          <li key={k.label}>
            <kbd className="font-mono font-semibold text-ink">{k.label}</kbd> {k.help}
          </li>
        ))}
        <li>Class keys win over the letter commands if a class set uses the same letter.</li>
        <li>Marks save as you go and are kept in this browser while offline.</li>
      </ul>
    </details>
  );
}
