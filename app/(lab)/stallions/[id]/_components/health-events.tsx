'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { HealthEventForm } from '@/components/forms/health-event-form';
import type { HealthEvent } from '@/db/queries/health-events';
import { apiFetch, ApiRequestError } from '@/lib/api/fetcher';
import { fmtDate } from '@/lib/format';

/** A stallion's health events with their windows; technicians and veterinarians record, change and delete them. */
export function HealthEvents({ stallionId, events, canWrite, today }: { stallionId: number; events: HealthEvent[]; canWrite: boolean; today: string }) {
  const router = useRouter();
  const [editing, setEditing] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);

  async function remove(e: HealthEvent) {
    if (!window.confirm(`Delete the ${e.kindLabel.toLowerCase()} of ${fmtDate(e.startedOn)}? Its window stops flagging collections.`)) return;
    setError(null);
    try {
      await apiFetch(`/api/health-events/${e.id}`, { method: 'DELETE' });
      router.refresh();
    } catch (err) {
      setError(err instanceof ApiRequestError ? err.message : 'The server could not be reached; nothing was deleted.');
    }
  }

  return (
    <div className="space-y-3">
      {events.length === 0 ? (
        <p className="text-sm text-ink-soft">No health events recorded.</p>
      ) : (
        <div className="overflow-x-auto">
          <table aria-label="Health events">
            <thead>
              <tr>
                <th className="th">Event</th><th className="th">Dates</th><th className="th">Particulars</th><th className="th">Window</th><th className="th">Recorded by</th>
                {canWrite && <th className="th"><span className="sr-only">Actions</span></th>}
              </tr>
            </thead>
            <tbody>
              {events.map((e) =>
                editing === e.id ? (
                  <tr key={e.id}>
                    <td className="td" colSpan={canWrite ? 6 : 5}>
                      <HealthEventForm stallionId={stallionId} eventId={e.id} initial={e} today={today} onSaved={() => { setEditing(null); router.refresh(); }} onCancel={() => setEditing(null)} />
                    </td>
                  </tr>
                ) : (
                  <tr key={e.id}>
                    <td className="td font-medium">{e.kindLabel}</td>
                    <td className="td whitespace-nowrap">{e.endedOn && e.endedOn !== e.startedOn ? `${fmtDate(e.startedOn)} – ${fmtDate(e.endedOn)}` : fmtDate(e.startedOn)}</td>
                    <td className="td">
                      {e.peakTemperatureC != null && <span className="block">Peak {e.peakTemperatureC.toFixed(1)} °C</span>}
                      {e.notes && <span className="block whitespace-pre-wrap">{e.notes}</span>}
                    </td>
                    <td className="td whitespace-nowrap">{e.window.totalDays} days, clears {fmtDate(e.window.clearsDate)}</td>
                    <td className="td">{e.recordedBy}{e.updatedBy ? ` (changed by ${e.updatedBy})` : ''}</td>
                    {canWrite && (
                      <td className="td whitespace-nowrap">
                        <button type="button" className="btn-secondary mr-2" onClick={() => setEditing(e.id)} aria-label={`Change ${e.kindLabel.toLowerCase()} of ${fmtDate(e.startedOn)}`}>Change</button>
                        <button type="button" className="btn-secondary" onClick={() => remove(e)} aria-label={`Delete ${e.kindLabel.toLowerCase()} of ${fmtDate(e.startedOn)}`}>Delete</button>
                      </td>
                    )}
                  </tr>
                ),
              )}
            </tbody>
          </table>
        </div>
      )}
      {error && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{error}</p>}
      {canWrite && (
        <details>
          <summary className="cursor-pointer text-sm font-medium text-brand-dark">Record a health event</summary>
          <div className="mt-3">
            <HealthEventForm stallionId={stallionId} today={today} onSaved={() => router.refresh()} />
          </div>
        </details>
      )}
    </div>
  );
}
