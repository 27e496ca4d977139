'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { describedBy, Field } from '@/components/ui/field';
import { useApiForm } from '@/lib/hooks/use-api-form';
import { HEALTH_EVENT_KIND_LABELS, HEALTH_EVENT_KINDS, type HealthEventKind } from '@/lib/health/kinds';
import { healthEventSchema, type HealthEventInput, type HealthEventValues } from '@/lib/validations/health-event';

export type HealthEventFormValues = { kind: HealthEventKind; startedOn: string; endedOn: string | null; peakTemperatureC: number | null; notes: string | null };

/** Records a health event (POST to the stallion) or changes one (PATCH to the event). */
export function HealthEventForm({ stallionId, eventId, initial, today, onSaved, onCancel }: {
  stallionId: number;
  eventId?: number;
  initial?: HealthEventFormValues;
  /** The lab's today, 'YYYY-MM-DD', the default start date. */
  today: string;
  onSaved: () => void;
  onCancel?: () => void;
}) {
  const idp = eventId ? `he-${eventId}` : 'he-new';
  const form = useForm<HealthEventInput, unknown, HealthEventValues>({
    resolver: zodResolver(healthEventSchema),
    // The temperature field leaves with the fever: a hidden value must not be sent for another kind.
    shouldUnregister: true,
    defaultValues: initial
      ? { kind: initial.kind, startedOn: initial.startedOn, endedOn: initial.endedOn ?? '', peakTemperatureC: initial.peakTemperatureC ?? '', notes: initial.notes ?? '' }
      : { kind: 'fever', startedOn: today, endedOn: '', peakTemperatureC: '', notes: '' },
  });
  const { send, formError } = useApiForm(form);
  const e = form.formState.errors;
  const kind = form.watch('kind');

  async function onSubmit(v: HealthEventValues) {
    const ok = eventId ? await send(`/api/health-events/${eventId}`, 'PATCH', v) : await send(`/api/stallions/${stallionId}/health-events`, 'POST', v);
    if (ok) {
      if (!eventId) form.reset({ kind: v.kind, startedOn: today, endedOn: '', peakTemperatureC: '', notes: '' });
      onSaved();
    }
  }

  return (
    <form onSubmit={form.handleSubmit(onSubmit)} noValidate className="space-y-3" aria-label={eventId ? 'Change health event' : 'Record a health event'}>
      <div className="grid gap-3 sm:grid-cols-4">
        <Field id={`${idp}-kind`} label="Kind of event" error={e.kind?.message}>
          <select id={`${idp}-kind`} className="input" {...describedBy(`${idp}-kind`, e.kind?.message)} {...form.register('kind')}>
            {HEALTH_EVENT_KINDS.map((k) => <option key={k} value={k}>{HEALTH_EVENT_KIND_LABELS[k]}</option>)}
          </select>
        </Field>
        <Field id={`${idp}-startedOn`} label="Start date" error={e.startedOn?.message}>
          <input id={`${idp}-startedOn`} type="date" className="input" {...describedBy(`${idp}-startedOn`, e.startedOn?.message)} {...form.register('startedOn')} />
        </Field>
        <Field id={`${idp}-endedOn`} label="End date (last day)" error={e.endedOn?.message} hint="Empty for a one-day event; the window runs on after the last day.">
          <input id={`${idp}-endedOn`} type="date" className="input" {...describedBy(`${idp}-endedOn`, e.endedOn?.message)} {...form.register('endedOn')} />
        </Field>
        {kind === 'fever' && (
          <Field id={`${idp}-peakTemperatureC`} label="Peak temperature (°C)" error={e.peakTemperatureC?.message} hint="Highest rectal temperature recorded.">
            <input id={`${idp}-peakTemperatureC`} type="number" step="0.1" className="input" {...describedBy(`${idp}-peakTemperatureC`, e.peakTemperatureC?.message)} {...form.register('peakTemperatureC')} />
          </Field>
        )}
      </div>
      <Field id={`${idp}-notes`} label="Notes" error={e.notes?.message} hint="Diagnosis, treatment and who attended, as the clinical record has them.">
        <textarea id={`${idp}-notes`} rows={2} className="input" {...describedBy(`${idp}-notes`, e.notes?.message)} {...form.register('notes')} />
      </Field>
      {formError && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{formError}</p>}
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={form.formState.isSubmitting}>{eventId ? 'Save changes' : 'Record event'}</button>
        {onCancel && <button type="button" className="btn-secondary" onClick={onCancel}>Cancel</button>}
      </div>
    </form>
  );
}
