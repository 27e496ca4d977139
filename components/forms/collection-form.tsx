'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { describedBy, Field } from '@/components/ui/field';
import { fmt } from '@/lib/format';
import { useApiForm } from '@/lib/hooks/use-api-form';
import { useLabTimeZone } from '@/components/time/lab-clock';
import { dateToWallTime, wallTimeToDate } from '@/lib/time/lab-time';
import { semenWarnings } from '@/lib/semen/arithmetic';
import { tryConcentrationFromChamber } from '@/lib/semen/chamber';
import { collectionSchema, OPTICS, PREPARATIONS, type CollectionInput, type CollectionValues } from '@/lib/validations/collection';

type Props = { stallions: { id: number; name: string }[]; collectionId?: number; initial?: Partial<Record<keyof CollectionInput, unknown>> };

const num = (v: unknown) => (v === '' || v == null || Number.isNaN(Number(v)) ? null : Number(v));

export function CollectionForm({ stallions, collectionId, initial }: Props) {
  const router = useRouter();
  const timeZone = useLabTimeZone();
  const checkValues = zodResolver(collectionSchema);
  const form = useForm<CollectionInput, unknown, CollectionValues>({
    // The date and time are typed on the lab's clock, whatever the browser's own zone.
    resolver: (values, context, options) => {
      const at = typeof values.collectedAt === 'string' ? wallTimeToDate(values.collectedAt, timeZone) : null;
      return checkValues(at ? { ...values, collectedAt: at.toISOString() } : values, context, options);
    },
    defaultValues: {
      concentrationMethod: 'entered',
      preparation: 'eosin_nigrosin',
      optics: 'bright_field',
      magnification: 1000,
      ...(initial as object),
      collectedAt: dateToWallTime(typeof initial?.collectedAt === 'string' ? initial.collectedAt : new Date(), timeZone),
    },
  });
  const { send, formError } = useApiForm(form);
  const { register, watch, formState } = form;
  const e = formState.errors;
  const method = watch('concentrationMethod');
  const values = watch();

  const chamber =
    method === 'chamber' && [values.chamberDilution, values.chamberSquares, values.chamberCount1, values.chamberCount2].every((v) => num(v) != null)
      ? tryConcentrationFromChamber({ dilution: num(values.chamberDilution)!, squaresCounted: num(values.chamberSquares)!, counts: [num(values.chamberCount1)!, num(values.chamberCount2)!] })
      : null;
  const warnings = Object.fromEntries(
    semenWarnings({
      volumeMl: num(values.volumeMl),
      concentrationMillionPerMl: method === 'chamber' ? (chamber?.ok ? chamber.concentrationMillionPerMl : null) : num(values.concentrationMillionPerMl),
      totalMotilityPct: num(values.totalMotilityPct),
      progressiveMotilityPct: num(values.progressiveMotilityPct),
    }).map((w) => [w.field, w.message]),
  );

  async function onSubmit(v: CollectionValues) {
    const r = await send<{ collection: { id: number } }>(collectionId ? `/api/collections/${collectionId}` : '/api/collections', collectionId ? 'PATCH' : 'POST', v);
    if (r) {
      router.push(`/collections/${r.collection.id}`);
      router.refresh();
    }
  }

  const err = (k: keyof CollectionInput) => e[k]?.message as string | undefined;
  return (
    <form onSubmit={form.handleSubmit(onSubmit)} noValidate className="space-y-6">
      <fieldset className="card grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <legend className="px-1 text-sm font-semibold">Ejaculate</legend>
        <Field id="stallionId" label="Stallion" error={err('stallionId')}>
          <select id="stallionId" className="input" {...describedBy('stallionId', err('stallionId'))} {...register('stallionId')}>
            <option value="">Choose…</option>
            {stallions.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </Field>
        <Field id="collectedAt" label="Collected at (date and time)" error={err('collectedAt')} hint={`On the lab’s clock (${timeZone.replaceAll('_', ' ')}).`}>
          <input id="collectedAt" type="datetime-local" className="input" {...describedBy('collectedAt', err('collectedAt'))} {...register('collectedAt')} />
        </Field>
        <Field id="collectedBy" label="Collected by" error={err('collectedBy')}>
          <input id="collectedBy" className="input" {...register('collectedBy')} />
        </Field>
        <Field id="volumeMl" label="Gel-free volume (mL)" error={err('volumeMl')} warning={warnings.volumeMl}>
          <input id="volumeMl" type="number" step="0.1" min="0" inputMode="decimal" className="input" {...describedBy('volumeMl', err('volumeMl'))} {...register('volumeMl')} />
        </Field>
        <Field id="totalMotilityPct" label="Total motility (%)" error={err('totalMotilityPct')}>
          <input id="totalMotilityPct" type="number" step="1" min="0" max="100" inputMode="decimal" className="input" {...describedBy('totalMotilityPct', err('totalMotilityPct'))} {...register('totalMotilityPct')} />
        </Field>
        <Field id="progressiveMotilityPct" label="Progressive motility (%)" error={err('progressiveMotilityPct')} warning={warnings.progressiveMotilityPct}>
          <input id="progressiveMotilityPct" type="number" step="1" min="0" max="100" inputMode="decimal" className="input" {...describedBy('progressiveMotilityPct', err('progressiveMotilityPct'))} {...register('progressiveMotilityPct')} />
        </Field>
      </fieldset>

      <fieldset className="card space-y-4">
        <legend className="px-1 text-sm font-semibold">Concentration</legend>
        <div className="flex flex-wrap gap-4 text-sm" role="radiogroup" aria-label="How the concentration was found">
          <label className="flex items-center gap-2"><input type="radio" value="entered" {...register('concentrationMethod')} /> Typed in (from a photometer or counter)</label>
          <label className="flex items-center gap-2"><input type="radio" value="chamber" {...register('concentrationMethod')} /> Counting chamber (improved Neubauer)</label>
        </div>
        {method === 'chamber' ? (
          <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
            <Field id="chamberDilution" label="Dilution (1 : n)" error={err('chamberDilution')} hint="e.g. 20 for 1:20">
              <input id="chamberDilution" type="number" min="1" className="input" {...describedBy('chamberDilution', err('chamberDilution'))} {...register('chamberDilution')} />
            </Field>
            <Field id="chamberSquares" label="Large squares counted (of 25)" error={err('chamberSquares')}>
              <input id="chamberSquares" type="number" min="1" max="25" className="input" {...describedBy('chamberSquares', err('chamberSquares'))} {...register('chamberSquares')} />
            </Field>
            <Field id="chamberCount1" label="Sperm counted, chamber 1" error={err('chamberCount1')}>
              <input id="chamberCount1" type="number" min="0" className="input" {...describedBy('chamberCount1', err('chamberCount1'))} {...register('chamberCount1')} />
            </Field>
            <Field id="chamberCount2" label="Sperm counted, chamber 2" error={err('chamberCount2')}>
              <input id="chamberCount2" type="number" min="0" className="input" {...describedBy('chamberCount2', err('chamberCount2'))} {...register('chamberCount2')} />
            </Field>
            <p className="text-sm sm:col-span-2 lg:col-span-4" aria-live="polite">
              {chamber?.ok
                ? chamber.agree
                  ? `Concentration ${fmt(chamber.concentrationMillionPerMl)} × 10⁶/mL (mean of the two chambers; counts agree).`
                  : `The counts differ by ${chamber.difference}, more than the ${fmt(chamber.allowedDifference)} expected by chance: recount both chambers.`
                : chamber && !chamber.ok
                  ? chamber.error.message
                  : 'Concentration = sperm counted × dilution ÷ (squares × 4 nL), shown once all four values are in.'}
            </p>
          </div>
        ) : (
          <Field id="concentrationMillionPerMl" label="Concentration (10⁶/mL)" error={err('concentrationMillionPerMl')} warning={warnings.concentrationMillionPerMl} className="max-w-xs">
            <input id="concentrationMillionPerMl" type="number" step="0.1" min="0" inputMode="decimal" className="input" {...describedBy('concentrationMillionPerMl', err('concentrationMillionPerMl'))} {...register('concentrationMillionPerMl')} />
          </Field>
        )}
      </fieldset>

      <fieldset className="card grid gap-4 sm:grid-cols-3">
        <legend className="px-1 text-sm font-semibold">Preparation for morphology</legend>
        <Field id="preparation" label="Preparation" error={err('preparation')}>
          <select id="preparation" className="input" {...register('preparation')}>
            {Object.entries(PREPARATIONS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
          </select>
        </Field>
        <Field id="optics" label="Optics" error={err('optics')}>
          <select id="optics" className="input" {...register('optics')}>
            {Object.entries(OPTICS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
          </select>
        </Field>
        <Field id="magnification" label="Magnification (×)" error={err('magnification')}>
          <input id="magnification" type="number" min="40" max="2000" className="input" {...describedBy('magnification', err('magnification'))} {...register('magnification')} />
        </Field>
        <Field id="remarks" label="Remarks" error={err('remarks')} className="sm:col-span-3">
          <textarea id="remarks" rows={3} className="input" {...register('remarks')} />
        </Field>
      </fieldset>

      {formError && <p role="alert" className="rounded-md bg-danger-bg px-3 py-2 text-sm text-danger">{formError}</p>}
      <div className="flex gap-3">
        <button type="submit" className="btn" disabled={formState.isSubmitting}>{formState.isSubmitting ? 'Saving…' : collectionId ? 'Save changes' : 'Save collection'}</button>
        <button type="button" className="btn-secondary" onClick={() => router.back()}>Cancel</button>
      </div>
    </form>
  );
}
