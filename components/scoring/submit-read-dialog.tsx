'use client';

import { useEffect, useRef, useState } from 'react';

/** "Submit this read?": says what will be locked, then submits through `onSubmit` (which saves first). */
export function SubmitReadDialog({
  open,
  onClose,
  cellsCounted,
  target,
  nonSpermCounted,
  targetReached,
  openCandidates,
  onSubmit,
  onSubmitted,
}: {
  open: boolean;
  onClose(): void;
  cellsCounted: number;
  target: number;
  nonSpermCounted: number;
  targetReached: boolean;
  /** Found cells not yet judged (marked or skipped) in the read; 0 when the read ignores them. */
  openCandidates: number;
  /** Resolves to a message a person can act on, or null once the read is submitted. */
  onSubmit(): Promise<string | null>;
  onSubmitted(): void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const [submitting, setSubmitting] = useState(false);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    else if (!open && d.open) d.close();
  }, [open]);

  const close = () => {
    setError(null);
    onClose();
  };

  const submit = async () => {
    setSubmitting(true);
    setError(null);
    try {
      const problem = await onSubmit();
      if (problem) setError(problem);
      else onSubmitted();
    } finally {
      setSubmitting(false);
    }
  };

  return (
    <dialog
      ref={ref}
      aria-labelledby="submit-heading"
      onClose={close}
      className="m-auto max-w-md rounded-lg border border-line bg-paper-raised p-5 shadow-xl backdrop:bg-black/40"
    >
      <h2 id="submit-heading">Submit this read?</h2>
      <p className="mt-2 text-sm">
        {cellsCounted} of {target} cells counted
        {nonSpermCounted ? `, ${nonSpermCounted} non-sperm cells tallied apart` : ''}. {!targetReached && <strong>The target is not reached yet. </strong>}
        After submitting, the read is locked and its marks can no longer be changed.
      </p>
      {openCandidates > 0 && (
        <p className="mt-2 rounded border border-warn bg-warn-bg px-2 py-1.5 text-sm" data-testid="open-candidates-warning">
          <strong>
            {openCandidates} found cell{openCandidates === 1 ? ' is' : 's are'} not judged yet.
          </strong>{' '}
          They are suggestions and count for nothing until you mark them; submit anyway only if you have judged the field another way.
        </p>
      )}
      {error && (
        <p className="mt-2 text-sm text-danger" role="alert">
          {error}
        </p>
      )}
      <div className="mt-4 flex justify-end gap-2">
        <button type="button" className="btn-secondary" onClick={close} disabled={submitting}>
          Keep scoring
        </button>
        <button type="button" className="btn" onClick={() => void submit()} disabled={submitting}>
          {submitting ? 'Submitting…' : 'Submit and lock'}
        </button>
      </div>
    </dialog>
  );
}
