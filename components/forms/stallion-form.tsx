'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { describedBy, Field } from '@/components/ui/field';
import { useApiForm } from '@/lib/hooks/use-api-form';
import { stallionSchema, type StallionInput, type StallionValues } from '@/lib/validations/stallion';

export function StallionForm({ clients, stallionId, initial }: { clients: { id: number; name: string }[]; stallionId?: number; initial?: Partial<StallionInput> }) {
  const router = useRouter();
  const form = useForm<StallionInput, unknown, StallionValues>({ resolver: zodResolver(stallionSchema), defaultValues: initial });
  const { send, formError } = useApiForm(form);
  const e = form.formState.errors;
  const err = (k: keyof StallionInput) => e[k]?.message as string | undefined;

  async function onSubmit(v: StallionValues) {
    const r = await send<{ stallion: { id: number } }>(stallionId ? `/api/stallions/${stallionId}` : '/api/stallions', stallionId ? 'PATCH' : 'POST', v);
    if (r) {
      router.push(`/stallions/${r.stallion.id}`);
      router.refresh();
    }
  }

  return (
    <form onSubmit={form.handleSubmit(onSubmit)} noValidate className="card grid max-w-3xl gap-4 sm:grid-cols-2">
      <Field id="name" label="Name" error={err('name')}>
        <input id="name" className="input" {...describedBy('name', err('name'))} {...form.register('name')} />
      </Field>
      <Field id="clientId" label="Owner" error={err('clientId')}>
        <select id="clientId" className="input" {...describedBy('clientId', err('clientId'))} {...form.register('clientId')}>
          <option value="">Choose…</option>
          {clients.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
        </select>
      </Field>
      <Field id="registration" label="Registration or microchip number" error={err('registration')}>
        <input id="registration" className="input" {...describedBy('registration', err('registration'))} {...form.register('registration')} />
      </Field>
      <Field id="breed" label="Breed" error={err('breed')}>
        <input id="breed" className="input" {...form.register('breed')} />
      </Field>
      <Field id="foalingYear" label="Foaling year" error={err('foalingYear')}>
        <input id="foalingYear" type="number" className="input" {...describedBy('foalingYear', err('foalingYear'))} {...form.register('foalingYear')} />
      </Field>
      <Field id="notes" label="Notes" error={err('notes')} className="sm:col-span-2">
        <textarea id="notes" rows={3} className="input" {...form.register('notes')} />
      </Field>
      {formError && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger sm:col-span-2">{formError}</p>}
      <div className="flex gap-3 sm:col-span-2">
        <button type="submit" className="btn" disabled={form.formState.isSubmitting}>{stallionId ? 'Save changes' : 'Save stallion'}</button>
        <button type="button" className="btn-secondary" onClick={() => router.back()}>Cancel</button>
      </div>
    </form>
  );
}
