import Link from 'next/link';
import { notFound } from 'next/navigation';
import { TestisForm } from '@/components/forms/testis-form';
import { ExportLinks } from '@/components/history/export-links';
import { collectionTimeline } from '@/db/queries/collections';
import { listHealthEvents } from '@/db/queries/health-events';
import { getLabSettings } from '@/db/queries/settings';
import { getStallion } from '@/db/queries/stallions';
import { listTestisMeasurements } from '@/db/queries/testis';
import { HEALTH_EVENT_WRITER_ROLES, STAFF_ROLES } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { billions, fmt, fmtDate } from '@/lib/format';
import { compareOutput, ellipsoidVolumeMl, estimateActualDso, predictedDailySpermOutputBillion, scrotalWidthCheck, totalTesticularVolume } from '@/lib/semen/testis';
import { CollectionsTable } from '../../collections/_components/collections-table';
import { nullIfNotFound } from '@/lib/api/errors';
import { labDayKey } from '@/lib/time/lab-time';
import { reEvaluateFrom } from '@/lib/windows/window';
import { HealthEvents } from './_components/health-events';

export const metadata = { title: 'Stallion' };

export default async function StallionPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser(STAFF_ROLES);
  const { id } = await params;
  if (!/^\d+$/.test(id)) notFound();
  const s = await nullIfNotFound(getStallion(user, Number(id)));
  if (!s) notFound();
  const [measurements, timeline, events, settings] = await Promise.all([listTestisMeasurements(s.id), collectionTimeline(s.id), listHealthEvents(user, s.id), getLabSettings()]);
  const reEvaluate = reEvaluateFrom(events.map((e) => ({ id: String(e.id), startDate: e.startedOn, endDate: e.endedOn })), settings);

  const rows = measurements.map((m) => {
    const left = m.leftLengthCm != null ? ellipsoidVolumeMl(m.leftLengthCm, m.leftWidthCm!, m.leftHeightCm!) : null;
    const right = m.rightLengthCm != null ? ellipsoidVolumeMl(m.rightLengthCm, m.rightWidthCm!, m.rightHeightCm!) : null;
    const total = left != null && right != null ? totalTesticularVolume(left, right) : null;
    return { m, left, right, total, predicted: total != null ? predictedDailySpermOutputBillion(total) : null, width: m.totalWidthCm != null ? scrotalWidthCheck(m.totalWidthCm) : null };
  });
  const latest = rows.find((r) => r.predicted);
  const actual = estimateActualDso(timeline.map((t) => ({ ...t, id: String(t.id) })));
  const comparison = latest?.predicted && actual.dsoBillion != null ? compareOutput(actual.dsoBillion, latest.predicted) : null;

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1>{s.name}</h1>
          <p className="text-sm text-ink-soft">
            {[s.breed, s.foalingYear && `foaled ${s.foalingYear}`, s.registration && `no. ${s.registration}`].filter(Boolean).join(' · ')} · owner {s.owner}
          </p>
          {s.notes && <p className="mt-1 text-sm">{s.notes}</p>}
        </div>
        <div className="flex gap-2">
          <Link href={`/collections/new?stallionId=${s.id}`} className="btn no-underline hover:no-underline">Record a collection</Link>
          <Link href={`/stallions/${s.id}/history`} className="btn-secondary no-underline hover:no-underline">History and charts</Link>
          <Link href={`/stallions/${s.id}/edit`} className="btn-secondary no-underline hover:no-underline">Edit</Link>
        </div>
      </div>

      {reEvaluate && (
        <p role="status" className="rounded-md bg-warn-bg px-4 py-3 text-sm text-warn">
          <span aria-hidden>⚑ </span>A health event’s spermatogenic window is open: collections until then may not show this stallion’s usual quality. <strong>Re-evaluate from {fmtDate(reEvaluate)}.</strong>
        </p>
      )}

      <section aria-labelledby="events-heading" className="card space-y-3">
        <h2 id="events-heading">Health events</h2>
        <p className="text-sm text-ink-soft">
          Each event opens a window from its first day until {settings.spermatogenesisDays} days of spermatogenesis and {settings.epididymalTransitDays} days of epididymal transit after its last day (lab settings):
          collections inside it are flagged.
        </p>
        <HealthEvents stallionId={s.id} events={events} canWrite={HEALTH_EVENT_WRITER_ROLES.includes(user.role)} today={labDayKey(new Date(), settings.timeZone)} />
        <p className="text-xs text-ink-faint">Figures support, and never replace, a veterinarian’s judgement; treatment and breeding decisions follow local regulations and licensed veterinary practice.</p>
      </section>

      <section aria-labelledby="collections-heading" className="space-y-3">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <h2 id="collections-heading">Collections ({s.collections})</h2>
          <ExportLinks endpoint={`/api/stallions/${s.id}/export`} params={{}} label="Export all collections" />
        </div>
        <CollectionsTable stallionId={s.id} />
      </section>


      <section aria-labelledby="testis-heading" className="card space-y-4">
        <h2 id="testis-heading">Testicular measurements and daily sperm output</h2>
        {rows.length === 0 ? (
          <p className="text-sm text-ink-soft">No measurements yet.</p>
        ) : (
          <div className="overflow-x-auto">
            <table aria-label="Testicular measurements">
              <thead>
                <tr>
                  <th className="th">Date</th><th className="th">Method</th><th className="th">Left (mL)</th><th className="th">Right (mL)</th>
                  <th className="th">Total volume (mL)</th><th className="th">Predicted DSO</th><th className="th">Scrotal width</th>
                </tr>
              </thead>
              <tbody>
                {rows.map(({ m, left, right, total, predicted, width }) => (
                  <tr key={m.id}>
                    <td className="td">{fmtDate(m.measuredOn)}</td>
                    <td className="td">{m.method}</td>
                    <td className="td">{fmt(left)}</td>
                    <td className="td">{fmt(right)}</td>
                    <td className="td font-medium">{fmt(total)}</td>
                    <td className="td">{predicted ? `${billions(predicted.billionPerDay)}/day` : '—'}</td>
                    <td className="td">{width ? `${fmt(width.widthCm)} cm — ${width.passes ? 'at least' : 'below'} ${width.thresholdCm} cm` : '—'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        <div className="text-sm">
          <p>
            <span className="text-ink-soft">Actual daily sperm output: </span>
            {actual.dsoBillion != null
              ? `${billions(actual.dsoBillion)}/day (mean total sperm of ${actual.usedIds.length} collection(s) after 7 or more daily collections)`
              : 'not yet known — it needs a run of at least 8 daily collections (about 24 h apart).'}
          </p>
          {comparison && (
            <p>
              <span className="text-ink-soft">Compared with the prediction from the latest measurement: </span>
              <strong>{fmt(comparison.percentOfPredicted, 0)} %</strong> of predicted.
            </p>
          )}
          <p className="mt-2 text-xs text-ink-faint">
            Volume of each testis = 0.5233 × length × width × height (ellipsoid); predicted DSO (10⁹/day) = 0.024 × total volume − 0.76 (Love et al. 1991).
          </p>
        </div>
        <details>
          <summary className="cursor-pointer text-sm font-medium text-brand-dark">Add a measurement</summary>
          <div className="mt-3"><TestisForm stallionId={s.id} /></div>
        </details>
      </section>
    </div>
  );
}
