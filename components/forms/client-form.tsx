'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { describedBy, Field } from '@/components/ui/field';
import { useApiForm } from '@/lib/hooks/use-api-form';
import { clientSchema, type ClientInput, type ClientValues } from '@/lib/validations/client';

export function ClientForm({ clientId, initial }: { clientId?: number; initial?: Partial<ClientInput> }) {
  const router = useRouter();
  const form = useForm<ClientInput, unknown, ClientValues>({ resolver: zodResolver(clientSchema), defaultValues: { kind: 'owner', ...initial } });
  const { send, formError } = useApiForm(form);
  const e = form.formState.errors;
  const err = (k: keyof ClientInput) => e[k]?.message as string | undefined;

  async function onSubmit(v: ClientValues) {
    const r = await send<{ client: { id: number } }>(clientId ? `/api/clients/${clientId}` : '/api/clients', clientId ? 'PATCH' : 'POST', v);
    if (r) {
      if (!clientId) form.reset({ kind: v.kind });
      router.push(`/clients/${r.client.id}`);
      router.refresh();
    }
  }

  return (
    <form onSubmit={form.handleSubmit(onSubmit)} noValidate className="grid gap-4 sm:grid-cols-2">
      <Field id="client-name" label="Name" error={err('name')}>
        <input id="client-name" className="input" {...describedBy('client-name', err('name'))} {...form.register('name')} />
      </Field>
      <Field id="client-kind" label="Kind">
        <select id="client-kind" className="input" {...form.register('kind')}>
          <option value="owner">Owner</option>
          <option value="referring_vet">Referring vet</option>
        </select>
      </Field>
      <Field id="client-email" label="E-mail" error={err('email')}>
        <input id="client-email" type="email" className="input" {...describedBy('client-email', err('email'))} {...form.register('email')} />
      </Field>
      <Field id="client-phone" label="Phone" error={err('phone')}>
        <input id="client-phone" className="input" {...form.register('phone')} />
      </Field>
      <Field id="client-address" label="Address" error={err('address')} className="sm:col-span-2">
        <input id="client-address" className="input" {...form.register('address')} />
      </Field>
      <Field id="client-notes" label="Notes" error={err('notes')} className="sm:col-span-2">
        <textarea id="client-notes" rows={2} className="input" {...form.register('notes')} />
      </Field>
      {formError && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger sm:col-span-2">{formError}</p>}
      <div className="sm:col-span-2">
        <button type="submit" className="btn" disabled={form.formState.isSubmitting}>{clientId ? 'Save changes' : 'Add client'}</button>
      </div>
    </form>
  );
}
