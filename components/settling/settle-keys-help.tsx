import { SETTLE_COMMANDS, keyLabel } from '@/lib/settling/keys';

/** The settle view's keys in words, read from the one key table (lib/settling/keys.ts). */
export function SettleKeysHelp() {
  return (
    <details className="text-xs text-ink-soft" open>
      <summary className="cursor-pointer text-sm font-medium text-ink">Keys</summary>
      <ul aria-label="Settle keys" className="mt-1 grid gap-x-6 gap-y-0.5 sm:grid-cols-2">
        {SETTLE_COMMANDS.map((c) => (
          <li key={c.id}>
            <span className="font-mono text-ink">{c.keys.map(keyLabel).join(' or ')}</span> — {c.help}
          </li>
        ))}
        <li>Each decision is saved as you make it (kept in this browser while offline) and the view moves on to the next unsettled disagreement.</li>
      </ul>
    </details>
  );
}
