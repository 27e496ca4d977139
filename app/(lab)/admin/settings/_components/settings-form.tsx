'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { describedBy, Field } from '@/components/ui/field';
import { useApiForm } from '@/lib/hooks/use-api-form';
import { LAB_SETTINGS_FIELDS, labSettingsSchema, type LabSettings } from '@/lib/settings/lab-settings';

export function SettingsForm({ initial, defaults, timeZones }: { initial: LabSettings; defaults: LabSettings; timeZones: string[] }) {
  const form = useForm<z.input<typeof labSettingsSchema>, unknown, LabSettings>({ resolver: zodResolver(labSettingsSchema), defaultValues: initial });
  const { send, formError } = useApiForm(form);
  const [saved, setSaved] = useState(false);
  const e = form.formState.errors;

  async function onSubmit(v: LabSettings) {
    setSaved(false);
    if (await send('/api/settings', 'PUT', v)) setSaved(true);
  }

  return (
    <form onSubmit={form.handleSubmit(onSubmit)} noValidate className="card space-y-4">
      <Field id="labName" label="Lab name (printed on signed reports)" error={e.labName?.message as string | undefined} hint="Reports cannot be signed until the lab’s name is set.">
        <input id="labName" className="input max-w-md" {...describedBy('labName', e.labName?.message as string | undefined)} {...form.register('labName')} />
      </Field>
      <Field id="labAddress" label="Lab address (printed on signed reports)" error={e.labAddress?.message as string | undefined} hint="One line; optional.">
        <input id="labAddress" className="input max-w-md" {...describedBy('labAddress', e.labAddress?.message as string | undefined)} {...form.register('labAddress')} />
      </Field>
      <div>
        <label className="flex items-center gap-2 text-sm font-medium">
          <input type="checkbox" aria-describedby="secondReadRequired-hint" {...form.register('secondReadRequired')} />
          Second read required before a report
        </label>
        <p id="secondReadRequired-hint" className="mt-1 text-xs text-ink-faint">
          On (default): a report is signed from the settled read of a first and a blind second read. Off: a collection read once may be reported from
          that single read, and the report says so. Fieldmark default; a lab’s own quality rule.
        </p>
      </div>
      <div>
        <label className="flex items-center gap-2 text-sm font-medium">
          <input type="checkbox" aria-describedby="showCandidates-hint" {...form.register('showCandidates')} />
          Show found cells on the scoring canvas
        </label>
        <p id="showCandidates-hint" className="mt-1 text-xs text-ink-faint">
          On (default): reads start with the cells Fieldmark found shown as faint rings, and the cell walk offers them one by one. Off: reads start
          without them (a reader can still turn them on for a read). They are suggestions either way; the reader decides every cell. Fieldmark default.
        </p>
      </div>
      {LAB_SETTINGS_FIELDS.map((f) => {
        const error = e[f.key]?.message as string | undefined;
        return (
          <Field key={f.key} id={f.key} label={`${f.label} (${f.unit})`} error={error} hint={`Default ${defaults[f.key]} — ${f.source}`}>
            <input id={f.key} type="number" step="any" className="input max-w-48" {...describedBy(f.key, error)} {...form.register(f.key)} />
          </Field>
        );
      })}
      <Field
        id="timeZone"
        label="Lab time zone"
        error={e.timeZone?.message as string | undefined}
        hint={`Collection times are entered and shown on this clock, and “ejaculate of the day” counts this zone’s days. Default ${defaults.timeZone}.`}
      >
        <select id="timeZone" className="input max-w-72" {...describedBy('timeZone', e.timeZone?.message as string | undefined)} {...form.register('timeZone')}>
          {timeZones.map((z) => (
            <option key={z} value={z}>
              {z.replaceAll('_', ' ')}
            </option>
          ))}
        </select>
      </Field>
      {formError && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{formError}</p>}
      {saved && <p role="status" className="rounded-md bg-ok-bg px-3 py-2 text-sm text-ok">Settings saved.</p>}
      <button type="submit" className="btn" disabled={form.formState.isSubmitting}>Save settings</button>
    </form>
  );
}
