'use client';

import { useState } from 'react';
import type { FieldValues, Path, UseFormReturn } from 'react-hook-form';
import { apiFetch, ApiRequestError } from '@/lib/api/fetcher';

/** Sends a react-hook-form's checked values to the JSON API and maps the server's field issues back onto the form. */
export function useApiForm<TIn extends FieldValues, TOut>(form: UseFormReturn<TIn, unknown, TOut>) {
  const [formError, setFormError] = useState<string | null>(null);
  async function send<R>(url: string, method: 'POST' | 'PATCH' | 'PUT', values: TOut): Promise<R | null> {
    setFormError(null);
    try {
      return await apiFetch<R>(url, { method, body: JSON.stringify(values) });
    } catch (err) {
      if (err instanceof ApiRequestError) {
        for (const issue of err.body.issues ?? []) form.setError(issue.path as Path<TIn>, { message: issue.message });
        setFormError(err.message);
      } else {
        setFormError('The server could not be reached; nothing was saved. Check the connection and try again.');
      }
      return null;
    }
  }
  return { send, formError };
}
