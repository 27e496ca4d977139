/** The workbench's keys and mouse, in words (the keys themselves: lib/scoring/keys.ts). */
export function KeysHelp() {
  return (
    <details className="text-xs text-ink-soft">
      <summary className="cursor-pointer text-sm font-medium text-ink">Keys and mouse</summary>
      <ul id="scoring-canvas-help" className="mt-1 list-disc space-y-0.5 pl-4">
        <li>Press a class key (digits; letters for non-sperm cells), then click a cell to mark it.</li>
        <li>“Keep this class” on: every click uses the chosen class. Off: the new mark is selected and the next key sets its class.</li>
        <li>Click a mark to select it; a class key then changes its class. Drag a mark to move it.</li>
        <li>Without a mouse: Tab to the image, pan a cell under the centre cross with the arrow keys, and press Enter to mark it (or to select the mark already there).</li>
        <li>Delete or Backspace removes the selected mark; Escape deselects.</li>
        <li>t opens the extra-defect checklist of the selected mark.</li>
        <li>Ctrl+Z undo; Ctrl+Shift+Z or Ctrl+Y redo (⌘ on a Mac).</li>
        <li>Drag empty space, Space+drag or the arrow keys (Shift: faster) pan; the wheel or + and − zoom; f fits the image.</li>
        <li>h hides or shows the marks; [ and ] go to the previous or next image.</li>
        <li>Class keys win over the letter commands if a class set uses the same letter.</li>
        <li>Marks save as you go and are kept in this browser while offline.</li>
      </ul>
    </details>
  );
}
