import type { ReactNode } from 'react';

/** A labelled form control with its hint, warning and error; the error is tied to the control for screen readers. */
export function Field({ id, label, error, warning, hint, children, className = '' }: { id: string; label: ReactNode; error?: string; warning?: string; hint?: ReactNode; children: ReactNode; className?: string }) {
  return (
    <div className={className}>
      <label htmlFor={id} className="label">{label}</label>
      {children}
      {hint && !error && <p id={`${id}-hint`} className="mt-1 text-xs text-ink-faint">{hint}</p>}
      {error && <p id={`${id}-error`} className="field-error">{error}</p>}
      {!error && warning && <p id={`${id}-warning`} className="mt-1 text-sm text-warn">⚠ {warning}</p>}
    </div>
  );
}

/** aria attributes for a control inside <Field>. */
export const describedBy = (id: string, error?: string) => ({ 'aria-invalid': Boolean(error), 'aria-describedby': error ? `${id}-error` : `${id}-hint ${id}-warning` });
