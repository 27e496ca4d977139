'use client';

import { OPEN, SUBMITTED, type ReadStatus } from '@/lib/reads/kinds';
import type { MarkSyncStatus } from '@/lib/hooks/use-mark-sync';

/** What the reader must know above the canvas: locked, view-only, target reached, refused or conflicting changes, storage trouble. */
export function ReadBanners({
  status,
  canEditRead,
  targetReached,
  cellsCounted,
  target,
  sync,
  notice,
  onDismissNotice,
}: {
  status: ReadStatus;
  /** The user is this read's reader (whatever its status). */
  canEditRead: boolean;
  targetReached: boolean;
  cellsCounted: number;
  target: number;
  sync: MarkSyncStatus;
  notice: string | null;
  onDismissNotice(): void;
}) {
  return (
    <>
      {status === SUBMITTED && (
        <p className="rounded-md border border-line bg-paper-sunk px-3 py-2 text-sm font-medium" data-testid="locked-banner">
          Submitted — locked. This read can no longer be changed.
        </p>
      )}
      {status === OPEN && !canEditRead && (
        <p className="rounded-md border border-line bg-paper-sunk px-3 py-2 text-sm">You can look at this read; only its reader can change it.</p>
      )}
      {targetReached && status === OPEN && (
        <p className="rounded-md border border-ok bg-ok-bg px-3 py-2 text-sm font-medium text-ok" data-testid="target-banner">
          Target reached — {cellsCounted} of {target} cells counted. Submit the read, or keep counting.
        </p>
      )}
      {sync.rejections.length > 0 && (
        <div className="rounded-md border border-danger bg-danger-bg px-3 py-2 text-sm text-danger">
          <p className="font-medium">The server refused {sync.rejections.length === 1 ? 'a change' : 'some changes'}:</p>
          <ul className="list-disc pl-5">
            {sync.rejections.map((m, i) => (
              <li key={i}>{m}</li>
            ))}
          </ul>
        </div>
      )}
      {notice && (
        <p className="flex items-center justify-between gap-2 rounded-md border border-warn bg-warn-bg px-3 py-2 text-sm text-warn">
          {notice}
          <button type="button" className="btn-secondary py-1" onClick={onDismissNotice}>
            Dismiss
          </button>
        </p>
      )}
      {sync.storageProblem && (
        <p className="rounded-md border border-warn bg-warn-bg px-3 py-2 text-sm text-warn">
          This browser will not keep unsent changes (storage full or disabled): do not close the tab until the status says “All changes saved”.
        </p>
      )}
    </>
  );
}
