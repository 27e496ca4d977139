'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { describedBy, Field } from '@/components/ui/field';
import { useApiForm } from '@/lib/hooks/use-api-form';
import { testisSchema, type TestisInput, type TestisValues } from '@/lib/validations/collection';

const DIMS = [
  ['LengthCm', 'length'],
  ['WidthCm', 'width'],
  ['HeightCm', 'height'],
] as const;

export function TestisForm({ stallionId }: { stallionId: number }) {
  const router = useRouter();
  const form = useForm<TestisInput, unknown, TestisValues>({ resolver: zodResolver(testisSchema), defaultValues: { method: 'caliper', measuredOn: new Date().toISOString().slice(0, 10) } });
  const { send, formError } = useApiForm(form);
  const e = form.formState.errors as Record<string, { message?: string } | undefined>;

  async function onSubmit(v: TestisValues) {
    if (await send(`/api/stallions/${stallionId}/testis`, 'POST', v)) {
      form.reset({ method: v.method, measuredOn: v.measuredOn });
      router.refresh();
    }
  }

  return (
    <form onSubmit={form.handleSubmit(onSubmit)} noValidate className="space-y-3" aria-label="Add testicular measurement">
      <div className="grid gap-3 sm:grid-cols-3">
        <Field id="measuredOn" label="Date" error={e.measuredOn?.message}>
          <input id="measuredOn" type="date" className="input" {...describedBy('measuredOn', e.measuredOn?.message)} {...form.register('measuredOn')} />
        </Field>
        <Field id="method" label="Method">
          <select id="method" className="input" {...form.register('method')}>
            <option value="caliper">Caliper</option>
            <option value="ultrasound">Ultrasound</option>
          </select>
        </Field>
        <Field id="totalWidthCm" label="Total scrotal width (cm)" error={e.totalWidthCm?.message}>
          <input id="totalWidthCm" type="number" step="0.1" className="input" {...describedBy('totalWidthCm', e.totalWidthCm?.message)} {...form.register('totalWidthCm')} />
        </Field>
      </div>
      {(['left', 'right'] as const).map((side) => (
        <fieldset key={side} className="grid grid-cols-3 gap-3">
          <legend className="text-sm font-medium capitalize">{side} testis (cm)</legend>
          {DIMS.map(([suffix, word]) => {
            const name = `${side}${suffix}` as keyof TestisInput;
            return (
              <Field key={name} id={name} label={`${side === 'left' ? 'Left' : 'Right'} ${word}`} error={e[name]?.message}>
                <input id={name} type="number" step="0.1" className="input" {...describedBy(name, e[name]?.message)} {...form.register(name)} />
              </Field>
            );
          })}
        </fieldset>
      ))}
      {formError && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{formError}</p>}
      <button type="submit" className="btn" disabled={form.formState.isSubmitting}>Add measurement</button>
    </form>
  );
}
