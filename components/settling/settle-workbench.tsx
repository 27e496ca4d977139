'use client';

import dynamic from 'next/dynamic';
import Link from 'next/link';
import { useCallback, useEffect, useMemo, useState } from 'react';
import type { DecisionView, SettleState } from '@/db/queries/settle-core';
import type { MarkClass } from '@/lib/class-sets/schema';
import { decisionStatusText, useDecisionSync, type DecisionPayload } from '@/lib/hooks/use-decision-sync';
import { useLatest } from '@/lib/hooks/use-latest';
import { isTextEntry } from '@/lib/scoring/keys';
import { ZOOM_STEP } from '@/lib/scoring/viewport';
import { keyHint, settleActionForKey, type SettleCommandId } from '@/lib/settling/keys';
import { ClassPicker } from './class-picker';
import { DecisionBar } from './decision-bar';
import { KeyCap } from './key-cap';
import { ReadPanel } from './read-panel';
import { SettleKeysHelp } from './settle-keys-help';

const FieldCanvas = dynamic(() => import('@/components/scoring/field-canvas').then((m) => m.FieldCanvas), {
  ssr: false,
  loading: () => <p className="flex h-full items-center justify-center text-sm text-white/80">Loading the canvas…</p>,
});

/** Image pixels to screen pixels when a disagreement is shown (a few cells around it). */
const START_SCALE = 1.6;

const NAV: [SettleCommandId, string][] = [['previous', 'Previous'], ['next', 'Next'], ['next-undecided', 'Next unsettled']];

const KIND_TEXT = { class: 'the readers gave different classes', 'only-first': 'only the first reader marked a cell here', 'only-second': 'only the second reader marked a cell here' } as const;

export function SettleWorkbench({ initial }: { initial: SettleState }) {
  const [state] = useState(initial);
  const list = state.disagreements;
  const classList = useMemo(() => state.classSet?.classes ?? [], [state.classSet]);
  const classes = useMemo(() => new Map(classList.map((c) => [c.key, c])), [classList]);
  const [local, setLocal] = useState<Map<string, DecisionPayload>>(() => new Map());
  const [rejected, setRejected] = useState<Set<string>>(() => new Set());
  const [settledReadId, setSettledReadId] = useState<number | null>(state.settled?.id ?? null);
  const [index, setIndex] = useState(() => Math.max(0, list.findIndex((d) => !d.decision)));
  const [zoom, setZoom] = useState(START_SCALE);
  const [recentre, setRecentre] = useState(0);
  const [pickerOpen, setPickerOpen] = useState(false);
  const [announcement, setAnnouncement] = useState('');

  const canDecide = state.mayDecide && settledReadId === null;
  const { status, enqueue } = useDecisionSync(state.collectionId, {
    onRestore: (pending) => setLocal(new Map(pending.flatMap((c) => (c.payload ? [[c.markId, c.payload] as const] : [])))),
    onAnswer: (a) => {
      if (a.settledReadId) setSettledReadId(a.settledReadId);
    },
    onRejected: (keys) => setRejected((r) => new Set([...r, ...keys])),
  });

  const decisionOf = useCallback((key: string, server: DecisionView | null): DecisionPayload | null => local.get(key) ?? (server ? { decision: server.decision, classKey: server.classKey } : null), [local]);
  const decided = list.filter((d) => decisionOf(d.key, d.decision) && !rejected.has(d.key)).length;
  const current = list[index];
  const image = current ? state.images.find((i) => i.id === current.imageId) : undefined;
  const imageNumber = image ? state.images.indexOf(image) + 1 : 0;
  const at = current ? (current.first ?? current.second)! : null;
  // A new object on every walk step, zoom or "centre": the canvases centre on it again.
  // eslint-disable-next-line react-hooks/exhaustive-deps -- recentre is the trigger
  const focus = useMemo(() => (at ? { x: at.x, y: at.y, scale: zoom } : null), [at, zoom, recentre]);
  const firstMarks = useMemo(() => state.marks.first.filter((m) => m.imageId === current?.imageId), [state.marks.first, current?.imageId]);
  const secondMarks = useMemo(() => state.marks.second.filter((m) => m.imageId === current?.imageId), [state.marks.second, current?.imageId]);

  const go = useCallback(
    (to: number) => {
      if (!list.length) return;
      const i = Math.max(0, Math.min(list.length - 1, to));
      setIndex(i);
      setAnnouncement(`Disagreement ${i + 1} of ${list.length}`);
    },
    [list.length],
  );

  const nextUndecided = useCallback(
    (from: number, decisions: Map<string, DecisionPayload>) => {
      for (let step = 1; step <= list.length; step++) {
        const d = list[(from + step) % list.length]!;
        if (!decisions.has(d.key) && !d.decision) return (from + step) % list.length;
      }
      return null;
    },
    [list],
  );

  const decide = useCallback(
    (payload: DecisionPayload) => {
      if (!current || !canDecide) return;
      enqueue(current.key, payload);
      const next = new Map(local).set(current.key, payload);
      setLocal(next);
      setRejected((r) => {
        if (!r.has(current.key)) return r;
        const copy = new Set(r);
        copy.delete(current.key);
        return copy;
      });
      setPickerOpen(false);
      const n = nextUndecided(index, next);
      const left = list.filter((d) => !next.has(d.key) && !d.decision).length;
      setAnnouncement(left === 0 ? 'Every disagreement is settled.' : `Settled. ${left} to go.`);
      if (n !== null) setIndex(n);
    },
    [current, canDecide, enqueue, local, nextUndecided, index, list],
  );

  const run = useCallback(
    (id: SettleCommandId) => {
      switch (id) {
        case 'first':
          return decide({ decision: 'first', classKey: null });
        case 'second':
          return decide({ decision: 'second', classKey: null });
        case 'not-cell':
          return decide({ decision: 'not-cell', classKey: null });
        case 'pick-class':
          if (canDecide && current) setPickerOpen(true);
          return;
        case 'next':
          return go(index + 1);
        case 'previous':
          return go(index - 1);
        case 'next-undecided': {
          const n = nextUndecided(index, local);
          if (n !== null) go(n);
          return;
        }
        case 'zoom-in':
          return setZoom((z) => Math.min(20, z * ZOOM_STEP));
        case 'zoom-out':
          return setZoom((z) => Math.max(0.1, z / ZOOM_STEP));
        case 'centre':
          return setRecentre((n) => n + 1);
      }
    },
    [decide, canDecide, current, go, index, nextUndecided, local],
  );

  const keys = useLatest({ run, pickerOpen, decide, classSet: { classes: classList } });
  useEffect(() => {
    const down = (e: KeyboardEvent) => {
      const k = keys.current;
      if (e.defaultPrevented || isTextEntry(e.target)) return;
      // Buttons keep Enter and Space; our keys are letters, arrows and + / −.
      const action = settleActionForKey(e, { pickerOpen: k.pickerOpen, classSet: k.classSet });
      if (!action) return;
      e.preventDefault();
      if (action.type === 'command') k.run(action.id);
      else if (action.type === 'class') k.decide({ decision: 'other', classKey: action.classKey });
      else setPickerOpen(false);
    };
    window.addEventListener('keydown', down);
    return () => window.removeEventListener('keydown', down);
  }, [keys]);

  const currentDecision = current ? decisionOf(current.key, current.decision) : null;
  const firstClass: MarkClass | undefined = current?.first ? classes.get(current.first.classKey) : undefined;
  const secondClass: MarkClass | undefined = current?.second ? classes.get(current.second.classKey) : undefined;
  const allDone = list.length > 0 && decided === list.length;
  const noop = useCallback(() => {}, []);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-3 rounded-lg border border-line bg-paper-raised px-3 py-2">
        <p className="text-sm font-medium" data-testid="settle-progress" aria-live="polite">
          {decided} of {list.length} settled
        </p>
        <p className="text-sm text-ink-soft" role="status">{decisionStatusText(status)}</p>
      </div>

      {settledReadId !== null && (
        <p className="rounded-md bg-ok-bg px-4 py-3 text-sm text-ok" role="status">
          Every disagreement is settled and the settled read is written: the collection’s figures, PMMN and report now use it.{' '}
          <Link href={`/collections/${state.collectionId}`}>Back to the collection</Link>
        </p>
      )}
      {settledReadId === null && allDone && status.waiting > 0 && <p className="text-sm text-ink-soft">Saving the last decisions; the settled read is written once the server has them all.</p>}
      {!state.mayDecide && state.whyNot && settledReadId === null && <p className="rounded-md bg-warn-bg px-4 py-3 text-sm text-warn">{state.whyNot} You can look, but not decide.</p>}
      {status.rejections.length > 0 && (
        <ul className="rounded-md bg-danger-bg px-4 py-2 text-sm text-danger" aria-label="Refused decisions">
          {status.rejections.map((r, i) => <li key={i}>{r}</li>)}
        </ul>
      )}

      {current && image && at ? (
        <>
          <div className="flex flex-wrap items-center justify-between gap-2">
            <h2 className="text-base" data-testid="settle-position">
              Disagreement {index + 1} of {list.length}: {KIND_TEXT[current.kind]}
              <span className="block text-xs font-normal text-ink-faint">
                Field image {imageNumber} of {state.images.length} ({image.fileName}) at ({Math.round(at.x)}, {Math.round(at.y)}) px
                {current.distance !== null ? ` · the two marks ${current.distance.toFixed(1)} px apart` : ''}
                {current.countsAsSperm ? '' : ' · non-sperm cell'}
              </span>
            </h2>
            <div className="flex gap-2">
              {NAV.map(([id, label]) => (
                <button key={id} type="button" className="btn-secondary" aria-keyshortcuts={keyHint(id)} onClick={() => run(id)} disabled={id === 'previous' ? index === 0 : id === 'next' ? index >= list.length - 1 : allDone}>
                  {label} <KeyCap k={keyHint(id)} />
                </button>
              ))}
            </div>
          </div>

          <div className="grid gap-3 md:grid-cols-2">
            {(['first', 'second'] as const).map((side) => {
              const read = side === 'first' ? state.first : state.second;
              const mark = side === 'first' ? current.first : current.second;
              const cls = side === 'first' ? firstClass : secondClass;
              return (
                <ReadPanel key={side} side={side} readerName={read?.readerName ?? ''} mark={mark} markClass={cls}>
                  <FieldCanvas
                    image={image}
                    marks={side === 'first' ? firstMarks : secondMarks}
                    classes={classes}
                    selectedId={mark?.id ?? null}
                    marksVisible
                    readOnly
                    currentClass={null}
                    onPlace={noop}
                    onSelect={noop}
                    onMove={noop}
                    focus={focus}
                  />
                </ReadPanel>
              );
            })}
          </div>

          <DecisionBar
            disagreement={current}
            firstClass={firstClass}
            secondClass={secondClass}
            decision={currentDecision}
            stored={local.has(current.key) ? null : current.decision}
            closed={settledReadId !== null}
            classes={classes}
            disabled={!canDecide}
            refused={rejected.has(current.key)}
            onRun={run}
          />
        </>
      ) : (
        <p className="card text-sm">{list.length === 0 ? (state.reason ?? 'Nothing to settle.') : 'The field image of this disagreement is missing.'}</p>
      )}

      <SettleKeysHelp />

      <ClassPicker open={pickerOpen} classes={classList} onChoose={(key) => decide({ decision: 'other', classKey: key })} onClose={() => setPickerOpen(false)} />
      <div className="sr-only" aria-live="polite" aria-atomic="true">{announcement}</div>
    </div>
  );
}
