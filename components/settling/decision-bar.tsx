'use client';

import { useLabTimeZone } from '@/components/time/lab-clock';
import type { DecisionView } from '@/db/queries/settle-core';
import type { Disagreement } from '@/lib/agreement/agreement';
import { fmtDateTime } from '@/lib/format';
import type { MarkClass } from '@/lib/class-sets/schema';
import type { DecisionPayload } from '@/lib/hooks/use-decision-sync';
import { keyHint, type SettleCommandId } from '@/lib/settling/keys';
import { KeyCap } from './key-cap';

/** The four decisions as buttons, with the decision in force on this disagreement. */
export function DecisionBar({
  disagreement: d,
  firstClass,
  secondClass,
  decision,
  stored,
  closed,
  classes,
  disabled,
  refused,
  onRun,
}: {
  disagreement: Disagreement;
  firstClass: MarkClass | undefined;
  secondClass: MarkClass | undefined;
  decision: DecisionPayload | null;
  /** The decision the server holds (who and when), if any. */
  stored: DecisionView | null;
  /** The settled read is written: decisions no longer change. */
  closed: boolean;
  classes: ReadonlyMap<string, MarkClass>;
  disabled: boolean;
  refused: boolean;
  onRun(id: SettleCommandId): void;
}) {
  const timeZone = useLabTimeZone();
  const by = stored ? ` by ${stored.decidedBy}, ${fmtDateTime(stored.decidedAt, timeZone)}` : '';
  const name = (c: MarkClass | undefined, m: Disagreement['first']) => (m ? (c?.name ?? m.classKey) : 'not a cell');
  const options: { id: SettleCommandId; label: string; pressed: boolean }[] = [
    { id: 'first', label: `First reader: ${name(firstClass, d.first)}`, pressed: decision?.decision === 'first' },
    { id: 'second', label: `Second reader: ${name(secondClass, d.second)}`, pressed: decision?.decision === 'second' },
    { id: 'pick-class', label: decision?.decision === 'other' ? `Another class: ${classes.get(decision.classKey ?? '')?.name ?? decision.classKey}` : 'Another class…', pressed: decision?.decision === 'other' },
    { id: 'not-cell', label: 'Not a cell', pressed: decision?.decision === 'not-cell' },
  ];
  return (
    <section aria-label="Decision" className="space-y-2 rounded-lg border border-line bg-paper-raised p-3">
      <div className="flex flex-wrap gap-2">
        {options.map((o) => (
          <button key={o.id} type="button" disabled={disabled} aria-pressed={o.pressed} aria-keyshortcuts={keyHint(o.id)} onClick={() => onRun(o.id)} className={o.pressed ? 'btn' : 'btn-secondary'}>
            {o.label} <KeyCap k={keyHint(o.id)} />
          </button>
        ))}
      </div>
      <p className="text-sm text-ink-soft" data-testid="settle-decision">
        {refused
          ? 'The server refused this decision: choose again.'
          : !decision
            ? 'Not settled yet.'
            : closed
              ? `Settled${by}. The settled read is written; its decisions no longer change.`
              : `Settled${by}; press another key to change it until the last disagreement is settled.`}
      </p>
    </section>
  );
}
